package analysis

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
)

// role is what a column holds.
type role int

const (
	roleNone role = iota
	roleTime
	rolePressure
	roleVolume
)

func (r role) String() string {
	return [...]string{"other", "time", "pressure", "volume"}[r]
}

// site is where a pressure or volume was measured.
type site int

const (
	siteUnknown site = iota
	siteLV
	siteAortic
	siteOther
)

// Words of column names (lower case, split at anything but letters and
// digits) that mark a column's role, site and unit. "µl" and "μl" (micro
// sign or Greek mu) read as "ul", so volume_ul, "Volume [µL]" and "LVV (uL)"
// all give µL.
var (
	timeWords     = wordSet("time t sec secs seconds timestamp elapsed")
	pressureWords = wordSet("pressure p press pres lvp plv aop")
	volumeWords   = wordSet("volume v vol lvv vlv")
	notSignal     = wordSet("dp dv dt dpdt dvdt derivative deriv flow q ecg elastance conductance")
	lvWords       = wordSet("lv left ventricle ventricular lvp plv lvv vlv")
	aorticWords   = wordSet("ao aop aortic aorta art arterial abp")
	otherSites    = wordSet("la ra rv pa atrial atrium pulmonary right wedge pcwp cvp esophageal venous")
	unitWords     = map[string]struct {
		role role
		unit string
	}{
		"s": {roleTime, "s"}, "sec": {roleTime, "s"}, "secs": {roleTime, "s"}, "seconds": {roleTime, "s"},
		"ms": {roleTime, "ms"}, "msec": {roleTime, "ms"},
		"mmhg": {rolePressure, "mmhg"}, "kpa": {rolePressure, "kpa"},
		"milliseconds": {roleTime, "ms"}, "millisecond": {roleTime, "ms"},
		"ml": {roleVolume, "ml"}, "ul": {roleVolume, "ul"}, "mcl": {roleVolume, "ul"},
		"microlitre": {roleVolume, "ul"}, "microliter": {roleVolume, "ul"}, "microlitres": {roleVolume, "ul"}, "microliters": {roleVolume, "ul"},
		"millilitre": {roleVolume, "ml"}, "milliliter": {roleVolume, "ml"}, "millilitres": {roleVolume, "ml"}, "milliliters": {roleVolume, "ml"},
	}
)

func wordSet(s string) map[string]bool {
	m := map[string]bool{}
	for _, w := range strings.Fields(s) {
		m[w] = true
	}
	return m
}

// header is what a column's name says about it.
type header struct {
	name string
	role role
	site site
	unit string // "" when the name gives none
	// unitRole is the role the unit belongs to, when the name gives a unit.
	unitRole role
}

// nameWords splits a column name into lower-case words.
func nameWords(name string) []string {
	name = strings.NewReplacer("µ", "u", "μ", "u").Replace(strings.ToLower(name))
	return strings.FieldsFunc(name, func(r rune) bool { return !unicode.IsLetter(r) && !unicode.IsDigit(r) })
}

// classify reads a column name.
func classify(name string) header {
	h := header{name: name}
	words := nameWords(name)
	var isTime, isP, isV, skip bool
	for _, w := range words {
		switch {
		case notSignal[w]:
			skip = true
		case timeWords[w]:
			isTime = true
		case pressureWords[w]:
			isP = true
		case volumeWords[w]:
			isV = true
		}
		if lvWords[w] {
			h.site = siteLV
		} else if aorticWords[w] && h.site == siteUnknown {
			h.site = siteAortic
		} else if otherSites[w] && h.site == siteUnknown {
			h.site = siteOther
		}
		if u, ok := unitWords[w]; ok {
			h.unit, h.unitRole = u.unit, u.role
		}
	}
	// "seconds" or "ms" alone name a time column.
	if !isTime && !isP && !isV && h.unitRole == roleTime && len(words) == 1 {
		isTime = true
	}
	switch {
	case skip:
	case isTime && !isP && !isV:
		h.role = roleTime
	case isP && !isV && !isTime:
		h.role = rolePressure
	case isV && !isP && !isTime:
		h.role = roleVolume
	case !isTime && !isP && !isV && h.unitRole == rolePressure:
		h.role = rolePressure // e.g. "LV (mmHg)"
	case !isTime && !isP && !isV && h.unitRole == roleVolume:
		h.role = roleVolume
	}
	return h
}

// chosen are the column indices to read; aortic is −1 when there is none,
// time is −1 when the rate is given instead.
type chosen struct {
	time, pressure, volume, aortic int
}

// chooseColumns picks the columns from the header names and the options.
//
// ierr makes an error at the header cell of column i (−1: the header line).
func chooseColumns(names []string, o ReadOptions, ierr func(i int, format string, a ...any) error) (chosen, error) {
	hs := make([]header, len(names))
	for i, n := range names {
		hs[i] = classify(n)
	}
	pick := func(flag, want string, r role, pred func(h header) bool, required bool) (int, error) {
		if want != "" {
			i, err := findColumn(names, want)
			if err != nil {
				return -1, ierr(-1, "--%s %s: %v", flag, quoteShort(want), err)
			}
			return i, nil
		}
		var found []int
		for i, h := range hs {
			if h.role == r && pred(h) {
				found = append(found, i)
			}
		}
		if len(found) > 1 {
			return -1, ierr(found[1], "%d columns could be the %s (%s): name the one to use with --%s",
				len(found), describe(r, pred), quoteCols(names, found), flag)
		}
		if len(found) == 1 {
			return found[0], nil
		}
		if required {
			return -1, ierr(-1, "no %s column found among %s; name it with --%s (looked for names such as %s)",
				describe(r, pred), quoteCols(names, nil), flag, examples(r))
		}
		return -1, nil
	}
	lv := func(h header) bool { return h.site == siteLV }
	unknown := func(h header) bool { return h.site == siteUnknown }
	anySite := func(header) bool { return true }
	var c chosen
	var err error
	if o.Rate > 0 && o.TimeCol == "" {
		c.time = -1
	} else if c.time, err = pick("time-col", o.TimeCol, roleTime, anySite, o.Rate == 0); err != nil {
		return c, err
	}
	if o.Rate > 0 && c.time >= 0 && o.TimeCol != "" {
		return c, ierr(-1, "give --time-col or --rate, not both")
	}
	if c.time < 0 && o.Rate == 0 {
		return c, ierr(-1, "no time column; name it with --time-col or give the sampling rate with --rate")
	}
	// LV pressure and volume: a column marked LV wins; otherwise one with no site.
	for _, x := range []struct {
		flag, want string
		r          role
		dst        *int
	}{{"pressure-col", o.PressureCol, rolePressure, &c.pressure}, {"volume-col", o.VolumeCol, roleVolume, &c.volume}} {
		i, err := pick(x.flag, x.want, x.r, lv, false)
		if err != nil {
			return c, err
		}
		if i < 0 {
			if i, err = pick(x.flag, x.want, x.r, unknown, true); err != nil {
				return c, err
			}
		}
		*x.dst = i
	}
	c.aortic = -1
	switch o.AorticCol {
	case "-":
	case "":
		c.aortic, _ = pick("aortic-col", "", rolePressure, func(h header) bool { return h.site == siteAortic }, false)
	default:
		if c.aortic, err = pick("aortic-col", o.AorticCol, rolePressure, anySite, false); err != nil {
			return c, err
		}
	}
	used := map[int]string{}
	for _, u := range []struct {
		i    int
		what string
	}{{c.time, "time"}, {c.pressure, "pressure"}, {c.volume, "volume"}, {c.aortic, "aortic pressure"}} {
		if u.i < 0 {
			continue
		}
		if prev, ok := used[u.i]; ok {
			return c, ierr(u.i, "chosen as both the %s and the %s column", prev, u.what)
		}
		used[u.i] = u.what
	}
	// A name whose unit belongs to another quantity is mislabelled.
	for _, u := range []struct {
		i int
		r role
	}{{c.time, roleTime}, {c.pressure, rolePressure}, {c.volume, roleVolume}, {c.aortic, rolePressure}} {
		if u.i < 0 {
			continue
		}
		if h := hs[u.i]; h.unit != "" && h.unitRole != u.r {
			return c, ierr(u.i, "used as the %s column but its name gives the unit %q, a unit of %s; check the columns and their names",
				u.r, h.unit, h.unitRole)
		}
	}
	return c, nil
}

// findColumn finds a column by name (case and surrounding spaces ignored) or
// by 1-based number.
func findColumn(names []string, want string) (int, error) {
	w := strings.TrimSpace(want)
	for i, n := range names {
		if strings.EqualFold(strings.TrimSpace(n), w) {
			return i, nil
		}
	}
	if k, err := strconv.Atoi(w); err == nil {
		if k >= 1 && k <= len(names) {
			return k - 1, nil
		}
		return -1, fmt.Errorf("column number out of range; the file has %d columns", len(names))
	}
	return -1, fmt.Errorf("no such column; the file has %s", quoteCols(names, nil))
}

func describe(r role, pred func(header) bool) string {
	switch {
	case pred(header{site: siteAortic}) && !pred(header{site: siteLV}):
		return "aortic pressure"
	case r == roleTime:
		return "time"
	}
	return "LV " + r.String()
}

func examples(r role) string {
	switch r {
	case roleTime:
		return `"time_s", "t", "Time (ms)"`
	case rolePressure:
		return `"pressure_mmhg", "LV Pressure (mmHg)", "LVP"`
	}
	return `"volume_ml", "LV Volume [ml]", "LVV"`
}

// quoteCols lists the named columns (all when idx is nil).
func quoteCols(names []string, idx []int) string {
	var q []string
	if idx == nil {
		for _, n := range names {
			q = append(q, strconv.Quote(n))
		}
	} else {
		for _, i := range idx {
			q = append(q, strconv.Quote(names[i]))
		}
	}
	return strings.Join(q, ", ")
}
