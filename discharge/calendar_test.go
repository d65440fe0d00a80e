package discharge

import "testing"

// CalendarText names calendar time in days from one day on, so that it is
// not read as a second runtime in hours ("26.0 h of use = 78.1 h at 8 h a
// day"); expected strings written by hand (26 h of use at 8 h a day is
// 3.25 days).
func TestCalendarText(t *testing.T) {
	cases := []struct {
		hoursPerDay, runtimeH, days float64
		want                        string
	}{
		{8, 26, 26.0 / 8, "3.25 days"},
		{1, 10.2, 10.2, "10.2 days"},
		{1, 1, 1, "1.00 days"},
		{1, 0.8, 0.8, "within the first day"},
		{1, 200, 200, "200 days"},
		{1, 400, 400, "13.1 months"},
	}
	for _, c := range cases {
		d := &Design{HoursPerDay: c.hoursPerDay}
		if got := d.CalendarText(&Result{RuntimeH: c.runtimeH, RuntimeDays: c.days}); got != c.want {
			t.Errorf("%g h of use at %g h a day: %q, want %q", c.runtimeH, c.hoursPerDay, got, c.want)
		}
	}
}
