// Package modeltest builds small model files for tests.
package modeltest

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/keyloom/keyloom/internal/bundle"
)

// Build writes a model of the given order estimated from text (running-text
// mode) into t.TempDir() and returns its path and bytes.
func Build(t testing.TB, text string, order, qbits int) (string, []byte) {
	t.Helper()
	_, data, err := bundle.Build(context.Background(), []bundle.Source{{Name: "test", R: strings.NewReader(text)}}, bundle.BuildOptions{Order: order, QuantBits: qbits})
	if err != nil {
		t.Fatalf("modeltest: build: %v", err)
	}
	path := filepath.Join(t.TempDir(), "test.klm")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatalf("modeltest: %v", err)
	}
	return path, data
}
