package main

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

// The bar stays silent for the first half second, then draws on the
// terminal's stderr, and wipes its line at the end; off a terminal there
// is none at all.
func TestMeterAfterHalfASecond(t *testing.T) {
	var b bytes.Buffer
	if m := newMeter(&b, false, "rows", 100); m != nil {
		t.Fatal("a meter off a terminal")
	}
	clock := time.Unix(0, 0)
	m := newMeter(&b, true, "rows", 100)
	m.now = func() time.Time { return clock }
	m.start = clock
	clock = clock.Add(400 * time.Millisecond)
	m.step(10)
	if b.Len() != 0 {
		t.Fatalf("drew %q before half a second", b.String())
	}
	clock = clock.Add(200 * time.Millisecond)
	m.step(50)
	if !strings.Contains(b.String(), "50/100 rows") {
		t.Fatalf("after 0.6 s: %q, want the count", b.String())
	}
	m.end()
	if !strings.HasSuffix(b.String(), "\r") {
		t.Errorf("the line is not wiped at the end: %q", b.String())
	}
}
