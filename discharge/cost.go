package discharge

// Cost per hour of use.
//
// A primary pack is bought once and used until cut-off: pack price ÷
// runtime.
//
// A rechargeable pack is bought once and recharged until it wears out; each
// charge also costs the energy put back. Three things set how many hours a
// pack gives over its life:
//
//   - Cycles are counted by the charge actually used (equivalent full
//     cycles, common practice in cell ageing work): a charge that uses a
//     tenth of the pack's rated capacity wears it a tenth of a cycle, not a
//     whole one. The pack's life throughput is CycleLife × rated capacity.
//   - The capacity fades over the cycle life, linearly to FadeAtEndOfLife
//     of rated at the last cycle (the usual end-of-life definition; value
//     from memory): over the life the pack holds on average
//     (1 + FadeAtEndOfLife)/2 of its rated capacity, so its throughput is
//     that much smaller.
//   - The charger (Design.ChargerPrice, 0 for none bought) is paid for by
//     the one pack's life: conservative when a charger outlives several
//     packs.
//
// Hours over the pack's life = throughput × (runtime ÷ charge delivered per
// charge), taking the hours a mAh buys as fixed (the load's current does
// not change with the pack's age). Cost per hour = (pack + charger) ÷ hours
// over the life + energy per charge × tariff ÷ runtime per charge.

// FadeAtEndOfLife is the fraction of rated capacity a rechargeable cell
// still holds at the end of its cycle life (80 %, the usual end-of-life
// criterion in makers' cycle-life figures; from memory).
const FadeAtEndOfLife = 0.8

// lifeHours is the hours of use a rechargeable pack gives over its cycle
// life: its equivalent-full-cycle throughput, faded, at the hours per mAh
// of one charge. 0 when nothing is delivered.
func lifeHours(d *Design, r *Result) float64 {
	c := d.Cell
	if r.DeliveredMAh <= 0 || r.RuntimeH <= 0 {
		return 0
	}
	ratedPack := c.RatedMAh * float64(d.Parallel)
	throughput := float64(c.CycleLife) * ratedPack * (1 + FadeAtEndOfLife) / 2
	return throughput * r.RuntimeH / r.DeliveredMAh
}

// costPerHour is the cost of one hour of use in dollars; 0 when the
// product does not run. chargeKWh is the energy one recharge takes from
// the mains.
func costPerHour(d *Design, r *Result, chargeKWh float64) float64 {
	if r.RuntimeH <= 0 {
		return 0
	}
	if !d.Cell.Rechargeable {
		return r.PackPrice / r.RuntimeH
	}
	elec := d.ElectricityPrice
	if elec == 0 {
		elec = DefaultElectricityPrice
	}
	energy := chargeKWh * elec / r.RuntimeH
	life := lifeHours(d, r)
	if life <= 0 {
		return energy
	}
	return (r.PackPrice+d.ChargerPrice)/life + energy
}
