package cflp

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The tiny instance of instance_test.go written by hand as a scenario:
// unit costs × demands give its cost matrix (2×20 = 40, 3×30 = 90, …).
const (
	goodSites     = "id,name,capacity,fixed_cost,status\nN,North,50,100,free\nS,South,40,80,\n"
	goodCustomers = "id,name,demand\na,,20\nb,,30\nc,,10\n"
	goodLanes     = "site,customer,unit_cost\nN,a,2\nN,b,3\nS,a,3\nS,b,1\nS,c,2\n"
)

func writeScenarioFiles(t testing.TB, dir, sites, customers, lanes string) {
	t.Helper()
	for name, body := range map[string]string{SitesFile: sites, CustomersFile: customers, LanesFile: lanes} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func sameInstance(t *testing.T, got, want *Instance, relTol float64) {
	t.Helper()
	if got.Name != want.Name || len(got.Sites) != len(want.Sites) || len(got.Customers) != len(want.Customers) {
		t.Fatalf("got %s %d×%d, want %s %d×%d", got.Name, len(got.Sites), len(got.Customers), want.Name, len(want.Sites), len(want.Customers))
	}
	for i := range want.Sites {
		if got.Sites[i] != want.Sites[i] {
			t.Errorf("site %d: got %+v, want %+v", i, got.Sites[i], want.Sites[i])
		}
	}
	for j := range want.Customers {
		if got.Customers[j] != want.Customers[j] {
			t.Errorf("customer %d: got %+v, want %+v", j, got.Customers[j], want.Customers[j])
		}
	}
	for i := range want.Cost {
		for j, w := range want.Cost[i] {
			g := got.Cost[i][j]
			if g != w && !(math.Abs(g-w) <= relTol*math.Abs(w)) {
				t.Errorf("cost[%d][%d] = %v, want %v", i, j, g, w)
			}
		}
	}
}

func TestReadScenario(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "tiny")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	writeScenarioFiles(t, dir, goodSites, goodCustomers, goodLanes)
	in, err := ReadScenario(dir)
	if err != nil {
		t.Fatal(err)
	}
	sameInstance(t, in, tiny(), 0)

	// Any column order, a byte order mark, upper case, extra columns and
	// quoted fields give the same instance.
	writeScenarioFiles(t, dir,
		"\ufeffStatus, Fixed_Cost ,notes,ID,capacity,name\nfree,100,x,N,50,North\n,80,\"y, z\",S,40,South\n",
		"demand,id,region\n20,a,east\n30,b,west\n10,c,\n",
		"unit_cost,customer,site\n2,a,N\n3,b,N\n3,a,S\n1,b,S\n2,c,S\n")
	in, err = ReadScenario(dir)
	if err != nil {
		t.Fatal(err)
	}
	sameInstance(t, in, tiny(), 0)

	writeScenarioFiles(t, dir, "id,capacity,fixed_cost,status\nN,50,100,OPEN\nS,40,80,closed\nT,60,10,Free\n",
		"id,demand\na,20\n", "site,customer,unit_cost\nN,a,1\nS,a,1\nT,a,0\n")
	in, err = ReadScenario(dir)
	if err != nil {
		t.Fatal(err)
	}
	if in.Sites[0].Status != ForcedOpen || in.Sites[1].Status != ForcedClosed || in.Sites[2].Status != Free || in.Cost[2][0] != 0 {
		t.Errorf("statuses %+v cost %v", in.Sites, in.Cost)
	}
}

func TestReadScenarioErrors(t *testing.T) {
	cases := []struct {
		name                    string
		sites, customers, lanes string
		file                    string
		line, col               int
		want                    string
	}{
		{"unknown site", "", "", "site,customer,unit_cost\nN,a,2\nX,b,3\n", LanesFile, 3, 1, `a site id from sites.csv: got "X"`},
		{"unknown customer", "", "", "site,customer,unit_cost\nN,a,2\nN,z,3\n", LanesFile, 3, 2, `customer id from customers.csv: got "z"`},
		{"duplicate site", "id,name,capacity,fixed_cost\nN,,50,100\nN,,40,80\n", "", "", SitesFile, 3, 1, `"N" is already used on line 2`},
		{"duplicate customer", "", "id,demand\na,20\nb,30\na,10\n", "", CustomersFile, 4, 1, `"a" is already used on line 2`},
		{"duplicate lane", "", "", goodLanes + "N,a,5\n", LanesFile, 7, 1, "lane N → a already given on line 2"},
		{"negative capacity", "id,name,capacity,fixed_cost,status\nN,North,50,100,free\nS,South,-40,80,\n", "", "", SitesFile, 3, 3,
			`capacity of site S (non-negative number): got "-40"`},
		{"missing fixed cost", "id,name,capacity,fixed_cost,status\nN,North,50,100,free\nS,South,40,,\n", "", "", SitesFile, 3, 4,
			"fixed cost of site S (non-negative number): the field is empty"},
		{"bad status", "id,name,capacity,fixed_cost,status\nN,North,50,100,free\nS,South,40,80,maybe\n", "", "", SitesFile, 3, 5,
			`status of site S (open, closed or free): got "maybe"`},
		{"no lane", "", "", "site,customer,unit_cost\nN,a,2\nN,b,3\nS,a,3\nS,b,1\n", CustomersFile, 4, 1, "customer c to have a lane"},
		{"lane only from closed", "id,capacity,fixed_cost,status\nN,50,100,\nS,40,80,closed\n", "", "", CustomersFile, 4, 1, "customer c to have a lane"},
		// Demand 20+30+10 = 60 against 20+30 = 50; the running total
		// passes 50 at c (line 4).
		{"capacity", "id,capacity,fixed_cost\nN,20,100\nS,30,80\n", "", "", CustomersFile, 4, 3,
			"total demand 60 exceeds total capacity 50 by 10"},
		// N forced closed leaves 40; the running total passes it at b.
		{"capacity with closed site", "id,capacity,fixed_cost,status\nN,50,100,closed\nS,40,80,free\n", "",
			"site,customer,unit_cost\nN,a,2\nS,a,3\nS,b,1\nS,c,2\n", CustomersFile, 3, 3,
			"total demand 60 exceeds total capacity 40 by 20"},
		{"missing column", "", "id,name,qty\na,,20\n", "", CustomersFile, 1, 0, "a column named demand in the header"},
		{"short record", "", "id,name,demand\na,Alpha\n", "", CustomersFile, 2, 3, "the record has only 2 fields"},
		{"bare quote", "", "id,name,demand\na,Al\"pha,20\n", "", CustomersFile, 2, 0, "a well-formed CSV record"},
		{"empty id", "", "id,name,demand\n,Alpha,20\n", "", CustomersFile, 2, 1, "customer id: the field is empty"},
		{"zero demand", "", "id,name,demand\na,,0\nb,,30\nc,,10\n", "", CustomersFile, 2, 3, `demand of customer a (positive number): got "0"`},
		{"bad unit cost", "", "", "site,customer,unit_cost\nN,a,abc\n", LanesFile, 2, 3, `unit cost of lane N → a (non-negative number): got "abc"`},
		{"infinite unit cost", "", "", "site,customer,unit_cost\nN,a,1e308\n", LanesFile, 2, 3, "finite"},
		{"repeated column", "id,capacity,ID,fixed_cost\n", "", "", SitesFile, 1, 3, `column "id" is also column 1`},
		{"empty file", "", "", " ", LanesFile, 1, 0, "the file is empty"},
		{"no sites", "id,capacity,fixed_cost\n", "", "", SitesFile, 1, 0, "at least one site"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sites, customers, lanes := c.sites, c.customers, c.lanes
			if sites == "" {
				sites = goodSites
			}
			if customers == "" {
				customers = goodCustomers
			}
			if lanes == "" {
				lanes = goodLanes
			}
			if lanes == " " {
				lanes = ""
			}
			dir := t.TempDir()
			writeScenarioFiles(t, dir, sites, customers, lanes)
			_, err := ReadScenario(dir)
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("got %v, want a *ParseError", err)
			}
			if pe.File != c.file || pe.Line != c.line || pe.Token != c.col || !strings.Contains(err.Error(), c.want) {
				t.Errorf("got %q at %s:%d:%d, want %s:%d:%d and %q", err, pe.File, pe.Line, pe.Token, c.file, c.line, c.col, c.want)
			}
		})
	}
	if _, err := ReadScenario(t.TempDir()); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("empty folder: got %v, want a wrapped os.ErrNotExist", err)
	}
}

func TestScenarioRoundTrip(t *testing.T) {
	in, err := Generate(7, 13, 1.5, 3)
	if err != nil {
		t.Fatal(err)
	}
	in.Sites[1].Status = ForcedOpen
	in.Sites[4].Status = ForcedClosed
	in.Cost[0][3] = math.Inf(1)
	in.Cost[6][12] = math.Inf(1)
	in.Sites[2].Name = `quoted "name", with comma`
	dir := filepath.Join(t.TempDir(), in.Name)
	if err := WriteScenario(dir, in); err != nil {
		t.Fatal(err)
	}
	back, err := ReadScenario(dir)
	if err != nil {
		t.Fatal(err)
	}
	// Costs go through unit cost = cost / demand and back, so they may move
	// by a rounding error.
	sameInstance(t, back, in, 1e-14)
}

func FuzzReadScenario(f *testing.F) {
	f.Add([]byte(goodSites), []byte(goodCustomers), []byte(goodLanes))
	f.Add([]byte("status,fixed_cost,id,capacity\nopen,1,A,1e3\n"), []byte("demand,id\n5,x\n"), []byte("site,customer,unit_cost\nA,x,0.5\n"))
	f.Add([]byte("id,capacity,fixed_cost\nN,20,100\nS,30,80\n"), []byte(goodCustomers), []byte("site,customer,unit_cost\nN,a,\"2\"\n"))
	f.Fuzz(func(t *testing.T, sites, customers, lanes []byte) {
		dir := t.TempDir()
		writeScenarioFiles(t, dir, string(sites), string(customers), string(lanes))
		in, err := ReadScenario(dir)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not a *ParseError", err)
			}
			return
		}
		if err := in.Validate(); err != nil {
			t.Fatalf("accepted an invalid instance: %v", err)
		}
	})
}
