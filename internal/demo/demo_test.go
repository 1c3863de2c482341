package demo

import (
	"bytes"
	"os"
	"testing"
)

// The demo in the binary and the copy in testdata/ must not drift apart.
func TestTestdataCopy(t *testing.T) {
	b, err := os.ReadFile("../../testdata/demo.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b, Text) {
		t.Error("testdata/demo.yaml differs from internal/demo/demo.yaml; copy one over the other")
	}
}
