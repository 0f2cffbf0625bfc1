package cflp

import (
	"bytes"
	"errors"
	"strings"
	"testing"
)

func TestWritePlanCSV(t *testing.T) {
	in := tiny()
	var b bytes.Buffer
	if err := WritePlanCSV(&b, in, [][]float64{{20, 10, 0}, {0, 20, 10}}); err != nil {
		t.Fatal(err)
	}
	// Costs by hand: 40·20/20, 90·10/30, 30·20/30, 20·10/10.
	want := "site,customer,quantity,cost,site_name,customer_name\nN,a,20,40,North,\nN,b,10,30,North,\nS,b,20,20,South,\nS,c,10,20,South,\n"
	if b.String() != want {
		t.Errorf("got\n%s\nwant\n%s", b.String(), want)
	}
	flow, err := ReadPlanCSV(strings.NewReader(b.String()), "plan.csv", in)
	if err != nil {
		t.Fatal(err)
	}
	if v := Verify(in, flow, false); !v.Feasible || v.Value != 290 {
		t.Errorf("read back: %+v, want the value 290 of TestVerifyHandExample", v)
	}
	if err := WritePlanCSV(&b, in, [][]float64{{20, 10, 1}, {0, 20, 9}}); err == nil {
		t.Error("plan using the forbidden lane N → c written without error")
	}
	if err := WritePlanCSV(&b, in, [][]float64{{20, 10, 0}}); err == nil {
		t.Error("plan of the wrong shape written without error")
	}
}

func TestWriteSitesCSV(t *testing.T) {
	in := tiny()
	var b bytes.Buffer
	// Utilisation by hand: 30/50 = 0.6, 0/40 = 0. The closed site's
	// capacity price is left empty (it is a price among open sites only).
	if err := WriteSitesCSV(&b, in, []bool{true, false}, []float64{30, 0}, []float64{1.5, 0}); err != nil {
		t.Fatal(err)
	}
	want := "id,name,open,capacity,load,utilisation,fixed_cost,capacity_price\n" +
		"N,North,yes,50,30,0.6,100,1.5\nS,South,no,40,0,0,80,\n"
	if b.String() != want {
		t.Errorf("got\n%s\nwant\n%s", b.String(), want)
	}
	b.Reset()
	if err := WriteSitesCSV(&b, in, []bool{true, false}, []float64{30, 0}, nil); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "N,North,yes,50,30,0.6,100,\n") {
		t.Errorf("without prices: %s", b.String())
	}
	if err := WriteSitesCSV(&b, in, []bool{true}, []float64{30, 0}, nil); err == nil {
		t.Error("short open slice accepted")
	}
}

func TestReadPlanCSVErrors(t *testing.T) {
	cases := []struct {
		name, src string
		line, col int
		want      string
	}{
		{"unknown site", "site,customer,quantity\nN,a,20\nX,b,1\n", 3, 1, `a site id of instance tiny: got "X"`},
		{"unknown customer", "customer,site,quantity\nq,N,1\n", 2, 1, `a customer id of instance tiny: got "q"`},
		{"duplicate", "site,customer,quantity,cost\nN,a,20,1\nN,a,0,0\n", 3, 1, "lane N → a already given on line 2"},
		{"negative", "site,customer,quantity\nN,a,-2\n", 2, 3, `got "-2"`},
		{"missing", "site,customer,quantity\nN,a,\n", 2, 3, "the field is empty"},
		{"no column", "site,customer,qty\n", 1, 0, "a column named quantity"},
	}
	for _, c := range cases {
		_, err := ReadPlanCSV(strings.NewReader(c.src), "plan.csv", tiny())
		var pe *ParseError
		if !errors.As(err, &pe) || pe.File != "plan.csv" || pe.Line != c.line || pe.Token != c.col || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want plan.csv:%d:%d and %q", c.name, err, c.line, c.col, c.want)
		}
	}
}

func FuzzReadPlanCSV(f *testing.F) {
	f.Add([]byte("site,customer,quantity,cost\nN,a,20,40\nN,b,10,30\nS,b,20,20\nS,c,10,20\n"))
	f.Add([]byte("quantity,site,customer\n1e3,S,c\n"))
	f.Add([]byte("site,customer,quantity\n\"N\",a,\"2\"\"\"\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		in := tiny()
		flow, err := ReadPlanCSV(bytes.NewReader(data), "plan.csv", in)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not a *ParseError", err)
			}
			return
		}
		// Whatever was read can be verified and written without panic.
		Verify(in, flow, true)
		var b bytes.Buffer
		_ = WritePlanCSV(&b, in, flow)
	})
}

func TestPlanCSVWithoutFloatNoise(t *testing.T) {
	in := tiny()
	var b bytes.Buffer
	// 0.1+0.2 is 0.30000000000000004 in binary; the plan shows 0.3.
	if err := WriteSitesCSV(&b, in, []bool{true, true}, []float64{0.1 + 0.2, 0}, []float64{8.237499999999999, 0}); err != nil {
		t.Fatal(err)
	}
	if s := b.String(); !strings.Contains(s, ",0.3,") || !strings.Contains(s, ",8.2375\n") {
		t.Errorf("noise in sites table:\n%s", s)
	}
}
