package bench

import (
	"fmt"
	"strings"
)

// selectByName returns the items of all with the given names (spaces
// around a name ignored), in the given order; nil or empty names select all
// of them. A name that is not known, or given twice, is an error that calls
// the items what and lists the known names.
func selectByName[T any](all []T, name func(T) string, names []string, what string) ([]T, error) {
	if len(names) == 0 {
		return all, nil
	}
	out := make([]T, 0, len(names))
	seen := map[string]bool{}
	for _, n := range names {
		n = strings.TrimSpace(n)
		if seen[n] {
			return nil, fmt.Errorf("%s %q named twice", what, n)
		}
		seen[n] = true
		found := false
		for _, s := range all {
			if name(s) == n {
				out = append(out, s)
				found = true
				break
			}
		}
		if !found {
			known := make([]string, len(all))
			for i, s := range all {
				known[i] = name(s)
			}
			return nil, fmt.Errorf("unknown %s %q (known: %s)", what, n, strings.Join(known, ", "))
		}
	}
	return out, nil
}
