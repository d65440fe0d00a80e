package protect_test

import (
	"fmt"

	"headroom/protect"
)

func ExampleParse() {
	d, err := protect.Parse("diode:is=10n,n=1.8,rs=0.08")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s drops %.3f V at 100 mA, 25 °C\n", d.Kind(), d.Drop(0.1, 3, 25))

	// A P-channel MOSFET turns less on as the pack sags.
	m, _ := protect.Parse("pmos:ron=45m,vref=4.5,vth=1.2")
	for _, vin := range []float64{3.2, 1.9, 1.1} {
		fmt.Printf("pmos from %.1f V: %5.1f mV at 100 mA\n", vin, 1e3*m.Drop(0.1, vin, 25))
	}

	_, err = protect.Parse("limiter:rsh=0")
	fmt.Println(err)
	// Output:
	// diode drops 0.761 V at 100 mA, 25 °C
	// pmos from 3.2 V:   6.9 mV at 100 mA
	// pmos from 1.9 V:  18.5 mV at 100 mA
	// pmos from 1.1 V: 664.5 mV at 100 mA
	// protect: limiter: key "rsh": 0 Ω is out of range: expected the sense resistance above 0 Ω and at most 10000 Ω
}

func ExampleElement_Reverse() {
	e := protect.Default("crowbar")
	r := e.Reverse(protect.Pack{Series: 2, CellV: 1.5, CellR: 0.15, Parallel: 1, LoadR: 10, TempC: 25})
	fmt.Printf("%s: %.2f A, %.1f ms\n", r.WholePack.Outcome, r.WholePack.Current, 1e3*r.WholePack.Seconds)
	fmt.Println(r.OneCell.Outcome)
	// Output:
	// fuse opens: 3.59 A, 10.5 ms
	// not seen
}

func ExampleWithPrimary() {
	l := protect.Default("limiter")
	k, _ := protect.PrimaryOf(l)
	// The limit from a 2×AA pack (3 V) at 25 °C.
	fmt.Printf("%s = %g, limit %.3f A\n", k.Key, k.Value, l.(protect.Limiter).ClampAt(3, 25))
	l, _ = protect.WithPrimary(l, k.Value/2)
	fmt.Printf("halved: limit %.3f A\n", l.(protect.Limiter).ClampAt(3, 25))
	// Output:
	// rsh = 1, limit 0.535 A
	// halved: limit 1.059 A
}
