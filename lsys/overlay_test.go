package lsys

import (
	"context"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestOverlayChecksKinds(t *testing.T) {
	mk := func(k float64) *System {
		s, err := FromMatrices(mat.NewDense(1, 1, []float64{-k}), mat.NewDense(1, 1, []float64{k}), mat.NewDense(1, 1, []float64{1}), nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	a, b := mk(1), mk(3)
	ra, err := Step(context.Background(), a, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rb, err := Step(context.Background(), b, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	o, err := NewOverlay([]string{"slow", "fast"}, []any{ra, rb})
	if err != nil || o.Len() != 2 || len(o.Responses) != 2 {
		t.Fatalf("two step responses: %v %+v", err, o)
	}
	fa, err := Frequency(context.Background(), a, FrequencyOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := NewOverlay([]string{"slow", "fast"}, []any{ra, fa}); err == nil || !strings.Contains(err.Error(), "one kind") {
		t.Errorf("a response with a frequency response: %v", err)
	}
	if _, err := NewOverlay([]string{"x", "y"}, []any{ra, 3.0}); err == nil {
		t.Error("a number was accepted")
	}
}
