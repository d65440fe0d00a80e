// Command spicebench evaluates the cross-check designs (spicenet.Cases) in
// headroom and in ngspice and prints a Markdown table of both runtimes,
// their difference, the median wall time of each and the speed ratio:
//
//	go run ./cmd/spicebench
//
// headroom's time is the median over batches of evaluations, per
// evaluation; ngspice's is the median of a few complete runs, each
// including starting the ngspice process, writing the netlist and reading
// the output, because that is what an engineer waits for.
package main

import (
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"time"

	"headroom/discharge"
	"headroom/internal/spice"
	"headroom/internal/spicenet"
)

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

func run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("spicebench", flag.ContinueOnError)
	fs.SetOutput(stderr)
	spiceRuns := fs.Int("spice-runs", 5, "ngspice runs per design")
	batches := fs.Int("batches", 21, "batches of headroom evaluations per design")
	batchTime := fs.Duration("batch", 20*time.Millisecond, "least wall time of one batch of headroom evaluations")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() > 0 || *spiceRuns < 1 || *batches < 1 || *batchTime <= 0 {
		fmt.Fprintln(stderr, "usage: spicebench [-spice-runs n] [-batches n] [-batch duration]")
		return 2
	}
	if !spice.Available() {
		fmt.Fprintln(stderr, "spicebench: ngspice not found; "+spice.InstallHint)
		return 1
	}
	cases, err := spicenet.Checks()
	if err != nil {
		fmt.Fprintln(stderr, "spicebench:", err)
		return 1
	}
	fmt.Fprintln(stdout, "| design | headroom h | ngspice h | difference | headroom time | ngspice time | ratio |")
	fmt.Fprintln(stdout, "|---|---:|---:|---:|---:|---:|---:|")
	for _, c := range cases {
		d := c.Design
		r, err := discharge.Evaluate(&d)
		if err != nil {
			fmt.Fprintf(stderr, "spicebench: %s: %v\n", c.Name, err)
			return 1
		}
		hTime := medianEval(&d, *batches, *batchTime)
		opt := spicenet.Options{CapacityFactor: r.CapacityFactor, StopHours: 1.2 * r.RuntimeH}
		if r.RuntimeH == 0 { // fails at once: simulate three cycles and see
			opt.StopHours, opt.NoStop = 3*spicenet.Period(&d), true
		}
		net, err := spicenet.Build(&d, opt)
		if err != nil {
			fmt.Fprintf(stderr, "spicebench: %s: %v\n", c.Name, err)
			return 1
		}
		var s spicenet.Result
		times := make([]time.Duration, *spiceRuns)
		for k := range times {
			t0 := time.Now()
			s, err = spicenet.Run(net)
			times[k] = time.Since(t0)
			if err != nil {
				fmt.Fprintf(stderr, "spicebench: %s: %v\n", c.Name, err)
				return 1
			}
		}
		sTime := median(times)
		diff := "—"
		if r.RuntimeH > 0 && s.CutoffH > 0 {
			diff = fmt.Sprintf("%+.1e", r.RuntimeH/s.CutoffH-1)
		} else if r.RuntimeH == 0 {
			diff = fmt.Sprintf("both fail on the first pulse (ngspice at %.0f s)", s.CutoffH*3600)
		}
		fmt.Fprintf(stdout, "| %s | %.4f | %.4f | %s | %s | %s | %s× |\n", c.Name, r.RuntimeH, s.CutoffH, diff,
			fmtDur(hTime), fmtDur(sTime), group(math.Round(float64(sTime)/float64(hTime))))
	}
	return 0
}

// medianEval times batches of evaluations of d, each batch lasting at
// least minBatch, and returns the median time per evaluation.
func medianEval(d *discharge.Design, batches int, minBatch time.Duration) time.Duration {
	// Size one batch from a short trial so that the clock's resolution
	// and the loop's overhead are negligible.
	n := 1
	for {
		t0 := time.Now()
		for range n {
			discharge.Evaluate(d)
		}
		if time.Since(t0) >= minBatch/4 {
			break
		}
		n *= 2
	}
	n *= 4
	per := make([]time.Duration, batches)
	for b := range per {
		t0 := time.Now()
		for range n {
			discharge.Evaluate(d)
		}
		per[b] = time.Since(t0) / time.Duration(n)
	}
	return median(per)
}

func median(ts []time.Duration) time.Duration {
	s := slices.Clone(ts)
	slices.Sort(s)
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

func fmtDur(d time.Duration) string {
	switch {
	case d < time.Millisecond:
		return fmt.Sprintf("%.1f µs", float64(d)/1e3)
	case d < time.Second:
		return fmt.Sprintf("%.1f ms", float64(d)/1e6)
	}
	return fmt.Sprintf("%.2f s", d.Seconds())
}

// group writes a whole number with thin-space thousands separators.
func group(x float64) string {
	s := fmt.Sprintf("%.0f", x)
	out := ""
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			out += "\u202f"
		}
		out += string(c)
	}
	return out
}
