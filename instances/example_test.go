package instances_test

import (
	"errors"
	"fmt"

	"pincer/instances"
)

func ExampleOption_Parse() {
	index := instances.Option{Name: "index", Kind: instances.Int, Default: "1", Min: 1, HasMin: true}
	v, err := index.Parse("3")
	fmt.Println(v, err)
	_, err = index.Parse("0")
	fmt.Println(err)
	sense := instances.Option{Name: "sense", Kind: instances.String, Allowed: []string{"min", "max"}}
	_, err = sense.Parse("up")
	fmt.Println(err)
	// Output:
	// 3 <nil>
	// --index "0": want at least 1
	// --sense "up": want one of min, max
}

func ExampleFormatNumber() {
	fmt.Println(instances.FormatNumber(1862.9699999999998), instances.FormatNumber(0.1+0.2), instances.FormatNumber(-0.0))
	// Output: 1862.97 0.3 0
}

func ExampleParseError() {
	err := error(&instances.ParseError{File: "sites.csv", Line: 3, Column: 9, Token: 3,
		Expected: "capacity (non-negative number)", Err: errors.New(`got "-40"`)})
	fmt.Println(err)
	// Output: sites.csv:3:9: token 3: expected capacity (non-negative number): got "-40"
}
