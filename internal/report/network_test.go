package report

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// TestNetworkHTMLDemo: the page of the demo network (invented) is
// well-formed, refers to nothing outside itself, has every section, and
// its rate-coefficient and yield tables hold the result's numbers cell
// for cell, formatted as the terminal's (4 significant digits); the
// figures are inlined.
func TestNetworkHTMLDemo(t *testing.T) {
	m, err := input.Parse(demo.NetworkName, demo.NetworkText)
	if err != nil {
		t.Fatal(err)
	}
	res, err := job.NetworkRates(context.Background(), m, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	chs := res.FitNetwork(m, 0.01)
	figs, err := figures.Network(res, withDefaults(figures.Units{}))
	if err != nil {
		t.Fatal(err)
	}
	page, err := NetworkHTML(Network{Result: res, Channels: chs, Title: m.Title, Input: m.Source, Figures: figs})
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	if refs := externalRefs(root); len(refs) > 0 {
		t.Errorf("the page references outside itself: %v", refs)
	}
	for _, id := range []string{"job", "caution-top", "rates", "refused", "source", "fits", "figures", "mechanism", "input", "caution"} {
		if root.byID(id) == nil {
			t.Errorf("no element with id %q", id)
		}
	}
	if n := len(root.byID("figures").find(named("svg"))); n != len(figs) {
		t.Errorf("%d inline figures, want %d", n, len(figs))
	}
	header, rows := root.byID("rates").cells()
	nw, np := len(res.Wells), len(res.Products)
	if len(rows) != len(res.Temperatures)*len(res.Pressures) || len(header) != 2+nw*(nw-1+np)+1 {
		t.Fatalf("rate table %d×%d", len(rows), len(header))
	}
	checked := 0
	for i := range res.Temperatures {
		for j := range res.Pressures {
			row := rows[i*len(res.Pressures)+j]
			k, kx := res.K[i][j], res.KProducts[i][j]
			if k == nil {
				if row[len(row)-1] != "refused" {
					t.Errorf("row %d: a refused point shows %q", i*len(res.Pressures)+j, row[len(row)-1])
				}
				continue
			}
			c := 2
			for a := range res.Wells {
				for b := range res.Wells {
					if a != b {
						checkCell(t, fmt.Sprintf("k(%d→%d) at %d,%d", a, b, i, j), row[c], k[b][a])
						c++
					}
				}
				for x := range res.Products {
					checkCell(t, fmt.Sprintf("k(%d→product %d) at %d,%d", a, x, i, j), row[c], kx[x][a])
					c++
				}
			}
			checkCell(t, "separation", row[c], res.Separation[i][j])
			checked++
		}
	}
	_, yrows := root.byID("source").cells()
	for i := range res.Temperatures {
		for j := range res.Pressures {
			st := res.Source.Stabilised[i][j]
			if st == nil {
				continue
			}
			row := yrows[i*len(res.Pressures)+j]
			for w, y := range st {
				checkCell(t, fmt.Sprintf("yield into well %d at %d,%d", w, i, j), row[2+w], y)
			}
		}
	}
	if checked == 0 {
		t.Fatal("no point solved")
	}
	if !strings.Contains(root.byID("job").text.String(), job.Version) {
		t.Error("the job paragraph does not name the version")
	}
}
