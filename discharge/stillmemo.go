package discharge

import (
	"slices"

	"headroom/internal/memo"
	"headroom/protect"
)

// The still junctions' settle, shared across evaluations. Behind constant
// currents and a junction (a diode or a Schottky) the junctions settle
// once per evaluation, with the fresh pack (settleStill), and what that
// settle reaches depends only on the element as given, the ambient, the
// phases' currents and durations and the sources the fresh node gives
// each phase (settlePhases: the pack's S·E and S·R0/P, with polarisation
// the node's E, each phase's own share per ampere, its mean and its
// per-cell current). A sweep evaluates the same design on the same
// profile many times: the outcome is kept per set of those inputs, to the
// bit, and shared read-only (the elements in it are immutable values).

// stillKey is every input the still settle depends on.
type stillKey struct {
	el        protect.Element // the element as given (a Diode or a Schottky value)
	T, S, P   float64
	pol       bool
	Epack, Rp float64
	E         float64
	loads     []Load // every one a constant current
	secs      []float64
	// with polarisation, per phase: own share per ampere, mean, per-cell current
	self, mean, icell []float64
}

// stillOutcome is what the settle left: each phase's temperature and
// element there, and the cycle recorded.
type stillOutcome struct {
	tj  []float64
	els []protect.Element
	cyc protect.Cycle
	ok  bool
}

// stillMemo keeps recent outcomes (internal/memo), shared read-only.
const stillCacheMax = 512

var stillMemo = memo.New[stillKey, *stillOutcome](stillCacheMax)

// stillKeyOf gathers the inputs of v's still settle with nd solved on
// the fresh pack at ambient; ok is false for an element the memo does
// not keep (anything but a diode or a Schottky: their values compare).
func (e *evaluator) stillKeyOf(nd *node) (stillKey, bool) {
	switch e.d.Protect.(type) {
	case protect.Diode, protect.Schottky:
	default:
		return stillKey{}, false
	}
	for _, l := range e.loads {
		if l.Kind != ConstantCurrent {
			return stillKey{}, false
		}
	}
	k := stillKey{el: e.d.Protect, T: e.T, S: e.S, P: e.P, pol: e.pol != nil, Epack: nd.Epack, Rp: nd.Rp, E: nd.E,
		loads: e.loads, secs: e.secs}
	if k.pol {
		k.self, k.mean, k.icell = nd.pol.self, nd.pol.mean, nd.icell
	}
	return k, true
}

func (k *stillKey) hash() uint64 {
	x := memo.Start().Float(k.T).Float(k.S).Float(k.P).Float(btoi(k.pol)).Float(k.Epack).Float(k.Rp).Float(k.E)
	x = x.Float(float64(len(k.loads)))
	for i := range k.loads {
		x = x.Float(k.loads[i].Amps).Float(k.secs[i])
	}
	for i := range k.self {
		x = x.Float(k.self[i]).Float(k.mean[i]).Float(k.icell[i])
	}
	return uint64(x)
}

// sameLoads is bit equality of two constant-current profiles' loads.
func sameLoads(a, b []Load) bool {
	return slices.EqualFunc(a, b, func(x, y Load) bool { return x.Kind == y.Kind && sameBits(x.Amps, y.Amps) })
}

// Same is bit equality of every input.
func (k stillKey) Same(o stillKey) bool {
	return k.el == o.el && sameBits(k.T, o.T) && sameBits(k.S, o.S) && sameBits(k.P, o.P) && k.pol == o.pol &&
		sameBits(k.Epack, o.Epack) && sameBits(k.Rp, o.Rp) && sameBits(k.E, o.E) &&
		sameLoads(k.loads, o.loads) && memo.SameFloats(k.secs, o.secs) &&
		memo.SameFloats(k.self, o.self) && memo.SameFloats(k.mean, o.mean) && memo.SameFloats(k.icell, o.icell)
}

// kept is k with its slices cloned (they belong to the evaluation), for
// the memo to keep.
func (k stillKey) kept() stillKey {
	k.loads, k.secs, k.self, k.mean, k.icell = slices.Clone(k.loads), slices.Clone(k.secs), slices.Clone(k.self), slices.Clone(k.mean), slices.Clone(k.icell)
	return k
}
