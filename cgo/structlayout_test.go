package main

import (
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"sort"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// headerStruct is one struct of ejecta.h with its fields in order.
type headerStruct struct {
	name   string
	fields []headerField
}

// headerField is one field of a struct of ejecta.h; array says it is
// declared with a dimension.
type headerField struct {
	name  string
	array bool
}

// headerLayout reads every struct and every integer constant ejecta.h
// defines.
func headerLayout(t *testing.T) ([]headerStruct, []string) {
	t.Helper()
	b, err := os.ReadFile("ejecta.h")
	require.NoError(t, err)
	text := regexp.MustCompile(`(?s)/\*.*?\*/`).ReplaceAllString(string(b), "")
	decl := regexp.MustCompile(`^(?:const\s+)?\w+\s*\*?\s*(\w+)(\[\w+\])?$`)
	var structs []headerStruct
	for _, m := range regexp.MustCompile(`(?s)typedef struct (\w+) \{(.*?)\} (\w+);`).FindAllStringSubmatch(text, -1) {
		require.Equal(t, m[1], m[3], "struct tag and typedef name differ")
		s := headerStruct{name: m[1]}
		for _, d := range strings.Split(m[2], ";") {
			d = strings.Join(strings.Fields(d), " ")
			if d == "" {
				continue
			}
			f := decl.FindStringSubmatch(d)
			require.NotNil(t, f, "%s: declaration %q is not one field per statement", s.name, d)
			s.fields = append(s.fields, headerField{name: f[1], array: f[2] != ""})
		}
		structs = append(structs, s)
	}
	require.NotEmpty(t, structs)
	var consts []string
	for _, m := range regexp.MustCompile(`(?m)^#define (EJECTA_\w+) \d+u?\s*$`).FindAllStringSubmatch(text, -1) {
		consts = append(consts, m[1])
	}
	require.NotEmpty(t, consts)
	return structs, consts
}

// layoutLines are "name value" lines (sizes, offsets, constants), keyed by
// name.
type layoutLines map[string]string

func parseLayout(t *testing.T, out string) layoutLines {
	t.Helper()
	l := layoutLines{}
	for _, line := range strings.Split(strings.TrimSpace(out), "\n") {
		k, v, ok := strings.Cut(strings.TrimSpace(line), " ")
		require.True(t, ok, "layout line %q", line)
		l[k] = strings.TrimSpace(v)
	}
	return l
}

// cLayout compiles and runs a C program, generated from the header's own
// declarations, that prints every struct's size, every field's offset and
// every constant as the C compiler sees them.
func cLayout(t *testing.T, structs []headerStruct, consts []string) layoutLines {
	t.Helper()
	gcc := requireTool(t, "gcc")
	var src strings.Builder
	src.WriteString("#include <stddef.h>\n#include <stdio.h>\n#include \"ejecta.h\"\nint main(void) {\n")
	for _, s := range structs {
		fmt.Fprintf(&src, "  printf(\"sizeof(%[1]s) %%zu\\n\", sizeof(%[1]s));\n", s.name)
		for _, f := range s.fields {
			fmt.Fprintf(&src, "  printf(\"%[1]s.%[2]s %%zu\\n\", offsetof(%[1]s, %[2]s));\n", s.name, f.name)
		}
	}
	for _, c := range consts {
		fmt.Fprintf(&src, "  printf(\"%[1]s %%lld\\n\", (long long)(%[1]s));\n", c)
	}
	src.WriteString("  return 0;\n}\n")
	dir := t.TempDir()
	file, bin := filepath.Join(dir, "layout.c"), filepath.Join(dir, "layout_c")
	require.NoError(t, os.WriteFile(file, []byte(src.String()), 0o644))
	compile(t, gcc, "-std=c11", "-Wall", "-Werror", "-I.", "-o", bin, file)
	return parseLayout(t, runHost(t, bin))
}

// fortranComponent is the component name ejecta_mod gives a C field
// ("type" is a Fortran keyword).
func fortranComponent(structName, field string) string {
	if structName == "ejecta_field" && field == "type" {
		return "elem_type"
	}
	return field
}

// fortranLayout compiles a Fortran program, generated from the header's
// declarations, against ejecta_mod: every struct must exist there as a
// type of the same name with every field as a component (else it does not
// compile), and every constant as a parameter. It prints the sizes,
// offsets and constants as gfortran lays them out.
func fortranLayout(t *testing.T, structs []headerStruct, consts []string) layoutLines {
	t.Helper()
	gfortran := requireTool(t, "gfortran")
	var src strings.Builder
	src.WriteString("program layout\n  use, intrinsic :: iso_c_binding\n  use ejecta_mod\n  implicit none\n")
	for i, s := range structs {
		fmt.Fprintf(&src, "  type(%s), target :: v%d\n", s.name, i)
	}
	for i, s := range structs {
		fmt.Fprintf(&src, "  print '(a,1x,i0)', 'sizeof(%s)', c_sizeof(v%d)\n", s.name, i)
		for _, f := range s.fields {
			ref := fmt.Sprintf("v%d%%%s", i, fortranComponent(s.name, f.name))
			if f.array {
				ref += "(1)"
			}
			fmt.Fprintf(&src, "  call offset('%s.%s', c_loc(v%d), c_loc(%s))\n", s.name, f.name, i, ref)
		}
	}
	for _, c := range consts {
		fmt.Fprintf(&src, "  print '(a,1x,i0)', '%[1]s', %[1]s\n", c)
	}
	src.WriteString(`contains
  subroutine offset(label, base, field)
    character(len=*), intent(in) :: label
    type(c_ptr), intent(in) :: base, field
    print '(a,1x,i0)', label, transfer(field, 0_c_intptr_t) - transfer(base, 0_c_intptr_t)
  end subroutine offset
end program layout
`)
	dir := t.TempDir()
	file, bin := filepath.Join(dir, "layout.f90"), filepath.Join(dir, "layout_fortran")
	require.NoError(t, os.WriteFile(file, []byte(src.String()), 0o644))
	args := []string{"-std=f2008", "-Wall", "-Werror", "-J", dir, "-o", bin, filepath.Join("fortran", "ejecta_mod.f90"), file}
	compile(t, gfortran, append(args, sharedLink(libraryDir(t))...)...) // the module's helpers call the library
	return parseLayout(t, runHost(t, bin))
}

// goMirrors are the Go mirrors of the structs of ejecta.h.
var goMirrors = map[string]reflect.Type{
	"ejecta_config":            reflect.TypeFor[configABI](),
	"ejecta_field":             reflect.TypeFor[fieldABI](),
	"ejecta_gas":               reflect.TypeFor[gasABI](),
	"ejecta_star":              reflect.TypeFor[starABI](),
	"ejecta_record":            reflect.TypeFor[recordABI](),
	"ejecta_quantities":        reflect.TypeFor[quantitiesABI](),
	"ejecta_ledger":            reflect.TypeFor[ledgerABI](),
	"ejecta_apply_report":      reflect.TypeFor[applyReportABI](),
	"ejecta_touched":           reflect.TypeFor[touchedABI](),
	"ejecta_population_config": reflect.TypeFor[populationConfigABI](),
	"ejecta_star_particle":     reflect.TypeFor[starParticleABI](),
	"ejecta_star_result":       reflect.TypeFor[starResultABI](),
	"ejecta_star_columns":      reflect.TypeFor[starColumnsABI](),
}

// goLayout lays out the Go mirrors as the lines the C program prints: a
// C field matches the Go field of the same name without underscores and
// case (fuv_field: FUVField), and a mirror must have no other fields.
func goLayout(t *testing.T, structs []headerStruct) layoutLines {
	t.Helper()
	l := layoutLines{}
	for _, s := range structs {
		typ, ok := goMirrors[s.name]
		if !assert.True(t, ok, "ejecta.h struct %s has no Go mirror in goMirrors", s.name) {
			continue
		}
		l["sizeof("+s.name+")"] = fmt.Sprint(typ.Size())
		assert.Equal(t, len(s.fields), typ.NumField(), "%s: C has %d fields, Go mirror %s has %d", s.name, len(s.fields), typ.Name(), typ.NumField())
		for _, f := range s.fields {
			want := strings.ReplaceAll(f.name, "_", "")
			gf, ok := typ.FieldByNameFunc(func(n string) bool { return strings.EqualFold(n, want) })
			if assert.True(t, ok, "%s.%s has no field in Go mirror %s", s.name, f.name, typ.Name()) {
				l[s.name+"."+f.name] = fmt.Sprint(gf.Offset)
			}
		}
	}
	return l
}

// compareLayouts reports every line of want that got lacks or differs in.
func compareLayouts(t *testing.T, what string, want, got layoutLines) {
	t.Helper()
	keys := make([]string, 0, len(want))
	for k := range want {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		v, ok := got[k]
		if assert.True(t, ok, "%s lacks %s", what, k) {
			assert.Equal(t, want[k], v, "%s: %s", what, k)
		}
	}
}

// TestStructLayoutsFieldByField checks every struct of ejecta.h, field by
// field, in all three languages: the C compiler's sizes and offsets (from
// a program generated from the header's declarations) against the Go
// mirrors (reflect) and against ejecta_mod as gfortran lays it out, and
// every integer constant of the header against ejecta_mod's parameters.
// A struct or field added to the header and not to a mirror fails here.
func TestStructLayoutsFieldByField(t *testing.T) {
	structs, consts := headerLayout(t)
	c := cLayout(t, structs, consts)
	t.Run("go", func(t *testing.T) {
		g := goLayout(t, structs)
		cStructs := layoutLines{}
		for k, v := range c {
			if !strings.HasPrefix(k, "EJECTA_") {
				cStructs[k] = v
			}
		}
		compareLayouts(t, "Go mirrors", cStructs, g)
	})
	t.Run("fortran", func(t *testing.T) {
		compareLayouts(t, "ejecta_mod", c, fortranLayout(t, structs, consts))
	})
}

// Every function ejecta.h declares has an interface in ejecta_mod binding
// the C name, and ejecta_mod binds nothing else.
func TestFortranModuleBindsEveryFunction(t *testing.T) {
	h, err := os.ReadFile("ejecta.h")
	require.NoError(t, err)
	f, err := os.ReadFile(filepath.Join("fortran", "ejecta_mod.f90"))
	require.NoError(t, err)
	collect := func(re string, text []byte) []string {
		var out []string
		for _, m := range regexp.MustCompile(re).FindAllSubmatch(text, -1) {
			out = append(out, string(m[1]))
		}
		sort.Strings(out)
		return out
	}
	declared := collect(`(?m)^int (ejecta_\w+)\(`, h)
	require.NotEmpty(t, declared)
	assert.Equal(t, declared, collect(`bind\(c, name='(ejecta_\w+)'\)`, f))
}
