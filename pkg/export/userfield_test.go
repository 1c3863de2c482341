package export

import (
	"math"
	"strings"
	"testing"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/fit"
)

// A user field is written under its entry as a flow mapping that a YAML
// reader gives back as written; a key or value YAML would misread, or a
// number that is not finite, is refused.
func TestUserFields(t *testing.T) {
	r := Reaction{Reactants: []string{"A"}, Products: []string{"B"}, Order: 1,
		Form: &fit.Arrhenius{A: 1e13, N: 0, Ta: 20000},
		UserFields: []UserField{{Key: "rate-uncertainty", Values: []UserValue{
			{Name: "f298", Numbers: []float64{2.5}}, {Name: "T-range", Numbers: []float64{300, 2000}}}}}}
	b, err := YAML(Header{}, Units{}, []Reaction{r})
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Reactions []map[string]any `yaml:"reactions"`
	}
	if err := yaml.Unmarshal(b, &doc); err != nil {
		t.Fatalf("%v\n%s", err, b)
	}
	u, ok := doc.Reactions[0]["rate-uncertainty"].(map[string]any)
	if !ok || u["f298"] != 2.5 || len(u["T-range"].([]any)) != 2 {
		t.Errorf("read back %v from\n%s", doc.Reactions[0], b)
	}
	for _, bad := range []UserField{
		{Key: "a: b", Values: []UserValue{{Name: "x", Numbers: []float64{1}}}},
		{Key: "k", Values: []UserValue{{Name: "x}", Numbers: []float64{1}}}},
		{Key: "k", Values: []UserValue{{Name: "x"}}},
		{Key: "k", Values: []UserValue{{Name: "x", Numbers: []float64{math.NaN()}}}},
	} {
		r.UserFields = []UserField{bad}
		if _, err := YAML(Header{}, Units{}, []Reaction{r}); err == nil || !strings.Contains(err.Error(), "user field") {
			t.Errorf("%+v: err = %v, want a refusal", bad, err)
		}
	}
}
