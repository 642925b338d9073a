package yield

import (
	"context"
	"errors"
	"testing"
)

func TestRunProgressAndCancel(t *testing.T) {
	pulls := inventedPulls(t, 6, 1)
	var calls, last int
	_, res, err := Run(context.Background(), pulls, 548, DefaultPlan(), MCOptions{Draws: 3500, Seed: 1}, func(done, of int) {
		calls++
		last = done
		if of != 3500 {
			t.Errorf("progress of %d, want 3500", of)
		}
	})
	if err != nil || calls != 4 || last != 3500 {
		t.Fatalf("err %v, %d progress calls ending at %d; want 4 ending at 3500", err, calls, last)
	}
	same, _ := Simulate(pulls, 548, DefaultPlan(), MCOptions{Draws: 3500, Seed: 1})
	if same.FlakeKg != res.FlakeKg {
		t.Errorf("Run and Simulate differ for one seed")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, _, err := Run(ctx, pulls, 548, DefaultPlan(), MCOptions{Draws: 3500, Seed: 1}, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled run: %v", err)
	}
}
