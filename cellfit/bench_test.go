package cellfit

import "testing"

// BenchmarkFitTwoLogs fits two synthetic 2,000-row logs (a pulse test and
// a constant-current discharge with its rest; two branches). The goal is
// at most 2 s on the project's machine.
func BenchmarkFitTwoLogs(b *testing.B) {
	logs := []*Log{pulseLog(7940.0 / 2000), ccLog(6820.0 / 2000)}
	if logs[0].Len() < 2000 || logs[1].Len() < 2000 {
		b.Fatalf("rows %d, %d: want 2,000 each", logs[0].Len(), logs[1].Len())
	}
	for b.Loop() {
		if _, err := Fit(logs, Options{Auto: true}); err != nil {
			b.Fatal(err)
		}
	}
}
