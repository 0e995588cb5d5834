package csvtable_test

import (
	"errors"
	"fmt"
	"strings"

	"github.com/ejecta-dev/ejecta/yields/csvtable"
)

// A format of two columns, one optional, read row by row.
func ExampleReader() {
	errMalformed := errors.New("malformed light table")
	text := `# light of a cluster
age[Myr],luminosity[Lsun]
1,2.5e6
10,4e5
`
	r := csvtable.NewReader(strings.NewReader(text), csvtable.Format{Name: "light table", Err: errMalformed})
	if _, err := r.ReadHeader(); err != nil {
		panic(err)
	}
	cols := []csvtable.Column{
		{Name: "age", Unit: "Myr", Required: true, Min: csvtable.Positive},
		{Name: "luminosity", Unit: "Lsun", Required: true, Min: csvtable.NonNegative},
		{Name: "ionizing_rate", Unit: "1/s"},
	}
	if err := r.Bind(cols); err != nil {
		panic(err)
	}
	for line, v := range r.Rows() {
		fmt.Printf("line %d: age %v Myr, luminosity %v Lsun\n", line, v[0], v[1])
	}
	if err := r.Err(); err != nil {
		panic(err)
	}
	fmt.Println("ionizing rate given:", r.Has(2))

	bad := csvtable.NewReader(strings.NewReader("age[Gyr],luminosity[Lsun]\n"), csvtable.Format{Name: "light table", Err: errMalformed})
	if _, err := bad.ReadHeader(); err != nil {
		panic(err)
	}
	err := bad.Bind(cols)
	fmt.Println(err)
	fmt.Println(errors.Is(err, errMalformed))
	// Output:
	// line 3: age 1 Myr, luminosity 2.5e+06 Lsun
	// line 4: age 10 Myr, luminosity 400000 Lsun
	// ionizing rate given: false
	// light table line 1: column "age": unit "Gyr", want "Myr": malformed light table
	// true
}
