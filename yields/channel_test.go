package yields

import "testing"

// Every channel a record can carry, the light channels included, has a
// name of its own, and only supernovae come as discrete events.
func TestEveryChannelHasAName(t *testing.T) {
	seen := map[string]Channel{}
	for c := Channel(0); c < NumAllChannels; c++ {
		name := c.String()
		if name == Channel(-1).String() {
			t.Errorf("channel %d prints as %q", int(c), name)
		}
		if d, dup := seen[name]; dup {
			t.Errorf("channels %d and %d are both %q", int(d), int(c), name)
		}
		seen[name] = c
		if want := c == CoreCollapse || c == TypeIa; c.Discrete() != want {
			t.Errorf("%s: discrete %v", name, c.Discrete())
		}
	}
	if RadiationPressure.String() != "radiation-pressure" || Photoionization.String() != "photoionization" {
		t.Errorf("light channels print as %q and %q", RadiationPressure, Photoionization)
	}
}
