package job

import (
	"errors"
	"testing"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

func TestByteSizeAndRoundUp(t *testing.T) {
	for _, c := range []struct {
		b    float64
		want string
	}{{400e6, "400 MB"}, {1.0904e9, "1.09 GB"}, {999, "999 B"}, {2.3e13, "23 TB"}} {
		if got := byteSize(c.b); got != c.want {
			t.Errorf("byteSize(%g) = %q, want %q", c.b, got, c.want)
		}
	}
	for _, c := range []struct{ x, want float64 }{{7.62, 7.7}, {0.00272, 0.0028}, {3.7, 3.7}, {120, 120}} {
		if got := roundUp(c.x, 2); got != c.want {
			t.Errorf("roundUp(%g, 2) = %g, want %g", c.x, got, c.want)
		}
	}
}

// The estimates name the sentinel of the package that would refuse the
// request, so callers can tell a request too large from other bad input.
func TestPreflightSentinels(t *testing.T) {
	for _, c := range []struct {
		grid     string
		sentinel error
	}{
		{"energy-grid: {fine-grain: 0.001 cm-1}", rrkm.ErrTooLarge},
		{"energy-grid: {master-equation-grain: 1 cm-1}", collision.ErrTooLarge},
	} {
		m, err := input.Parse("demo.yaml", []byte(string(demo.Text)+c.grid+"\n"))
		if err != nil {
			t.Fatal(err)
		}
		_, err = New(m)
		var fe *input.FieldError
		if !errors.As(err, &fe) || !errors.Is(err, c.sentinel) {
			t.Errorf("%s: %v, want a *input.FieldError wrapping %v", c.grid, err, c.sentinel)
		}
	}
}
