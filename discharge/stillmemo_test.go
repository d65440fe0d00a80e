package discharge

import (
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"sync"
	"testing"
)

// The memos shared across evaluations (stillMemo: the still junctions'
// settle; protect's heatMemo; polMemo) against evaluating afresh: on 300
// random library designs of TestShortcutsMatchGeneral's kind, each
// evaluated with the memos emptied and then again from them, on four
// goroutines at once (run with -race), every figure and word of the
// Result is the same to the bit — a memo hands back the very numbers
// the solve made, so nothing looser would be right. The general path
// (TestShortcutsMatchGeneral) never uses stillMemo, so that test holds
// the memo's first, fresh settle to it; this one holds its later hits to
// the fresh one. It fails if no still settle came from the memo.
func TestMemosGiveSameResult(t *testing.T) {
	rng := rand.New(rand.NewPCG(47, 3))
	var designs []*Design
	for range 300 {
		designs = append(designs, shortcutDesign(rng))
	}
	stillMemo.Clear()
	fresh := make([]*Result, len(designs))
	for i, d := range designs {
		if r, err := Evaluate(d); err == nil {
			fresh[i] = r
		}
	}
	hits := stillMemo.Len() // settles kept: the pass below takes each from the memo
	if hits < 20 {
		t.Fatalf("only %d of %d designs settle still junctions the memo keeps: the check hardly covers it", hits, len(designs))
	}
	var wg sync.WaitGroup
	for g := range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := g; i < len(designs); i += 4 {
				r, err := Evaluate(designs[i])
				if (err == nil) != (fresh[i] != nil) {
					t.Errorf("design %d: error %v from the memos, fresh result %v", i, err, fresh[i] != nil)
					continue
				}
				if err == nil {
					if diff := sameResult(r, fresh[i]); diff != "" {
						t.Errorf("design %d: %s", i, diff)
					}
				}
			}
		}()
	}
	wg.Wait()
	t.Logf("%d still settles kept and taken from the memo", hits)
}

// sameResult names the first field of two Results that differs in its
// bits, "" when none does.
func sameResult(a, b *Result) string {
	av, bv := reflect.ValueOf(*a), reflect.ValueOf(*b)
	for i := range av.NumField() {
		x, y := av.Field(i), bv.Field(i)
		name := av.Type().Field(i).Name
		switch x.Kind() {
		case reflect.Float64:
			if math.Float64bits(x.Float()) != math.Float64bits(y.Float()) {
				return name + " differs"
			}
		case reflect.String, reflect.Int, reflect.Bool:
			if !x.Equal(y) {
				return name + " differs"
			}
		case reflect.Slice:
			if name == "Warnings" && !slices.Equal(a.Warnings, b.Warnings) {
				return "warnings differ"
			}
		}
	}
	return ""
}
