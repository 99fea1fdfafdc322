package analysis

import (
	"fmt"
	"strings"
)

// Species is what a species hint tells the analysis: the heart rates beats
// are searched within, and the ranges of rate and end-diastolic volume a
// recording of that species usually shows (docs/science.md §14). A value
// outside them is warned about, not refused; volumes far outside them (a
// factor of 20) mean the volume unit is wrong and are refused.
type Species struct {
	Name           string
	MinHR, MaxHR   float64 // bpm, usual range in studies (anaesthetised small animals)
	MinEDV, MaxEDV float64 // mL
	Source         string  // where the ranges come from
	// Small hearts are shown in µL (tables, explorer).
	Small bool
}

// SpeciesList holds the species hints (docs/science.md §14; every range is
// recalled, not checked against a source, and only warns).
var SpeciesList = []Species{
	{"human", 40, 180, 50, 350, "from memory; EDV widened from the adult MR values of Hudsmith et al. 2005 (docs/science.md §8) for disease", false},
	{"pig", 60, 150, 40, 250, "from memory (farm pigs of 30–80 kg)", false},
	{"dog", 60, 200, 25, 150, "from memory (dogs of 15–30 kg)", false},
	{"sheep", 60, 160, 40, 200, "from memory (adult sheep)", false},
	{"rat", 250, 500, 0.1, 0.6, "from memory (anaesthetised adult rats)", true},
	{"mouse", 350, 750, 0.012, 0.08, "from memory (anaesthetised adult mice)", true},
}

// Heart rates any recording may have, bpm: beat detection searches this
// range when no species is given (common practice, no source: from a
// resting large animal to a mouse).
const (
	MinHeartRate = 30
	MaxHeartRate = 800
)

// SpeciesByName returns the hint for a species name (case ignored).
func SpeciesByName(name string) (*Species, error) {
	var names []string
	for i := range SpeciesList {
		s := &SpeciesList[i]
		if strings.EqualFold(s.Name, strings.TrimSpace(name)) {
			return s, nil
		}
		names = append(names, s.Name)
	}
	return nil, fmt.Errorf("--species %s: allowed %s", quoteShort(name), strings.Join(names, ", "))
}

// hrRange is the range of heart rates beats are searched within, bpm.
func (s *Species) hrRange() (lo, hi float64) {
	if s == nil {
		return MinHeartRate, MaxHeartRate
	}
	// A margin of a third each way: a hint narrows the search, it does not
	// hide a beat at an unusual rate.
	return max(MinHeartRate, s.MinHR/1.33), min(MaxHeartRate, s.MaxHR*1.33)
}
