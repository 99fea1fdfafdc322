package cli

import (
	"bytes"
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"pvcouple/figure"
	"pvcouple/internal/safetext"
	"pvcouple/model"
	"pvcouple/presets"
)

func init() {
	register(command{"figure", "draw the baseline and what-if loops with their relations to an SVG or PNG file", runFigure})
}

const figureAbout = `Draws the steady pressure–volume loop of the what-if (the selected scenario with the
--set changes) over that of its baseline: each with its ESPVR (through V0, slope Ees),
EDPVR and Ea line from (EDV, 0) to (ESV, ESP), the baseline dashed, a legend, a table of
the readouts that changed (baseline → what-if, Δ, Δ %) and a caption, ready for a
protocol document. The format follows the -o extension: .svg or .png.

The baseline is, in this order: the scenario named by --baseline; the scenario's own
'baseline:' section; the scenario (or preset) without the --set changes. When the
baseline and the what-if are the same, the loop is drawn alone with its readouts.

Example: pvcouple figure --set resistance_mmhg_s_per_ml=1.7 -o afterload.svg`

func runFigure(env *Env, args []string) error {
	fs := newFlags(env, "figure",
		"figure [--preset NAME | --scenario FILE] [--circulation held|closed] [--set KEY=VALUE]... [--baseline FILE] -o FILE.svg|FILE.png [--size WxH] [--dpi N] [--title TEXT] [--force]",
		figureAbout)
	var sel selection
	sel.addFlags(fs)
	baseline := fs.String("baseline", "", "scenario `FILE` whose parameters are the baseline")
	out := fs.String("o", "", "output `FILE`, .svg or .png")
	fs.StringVar(out, "output", "", "the same as -o `FILE`")
	size := fs.String("size", figure.DefaultSize, "figure size `WxH` with a unit: cm, mm, in or px")
	dpi := fs.Int("dpi", figure.DefaultDPI, "PNG resolution `N`, pixels per inch (also the scale of a size in px)")
	title := fs.String("title", "", "heading `TEXT` instead of the list of changed parameters")
	force := fs.Bool("force", false, "overwrite FILE if it exists")
	pos, err := parse(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("figure takes no arguments, got %q; name the output with -o FILE.svg", pos[0])
	}
	if *out == "" {
		return usagef("figure needs an output file: -o FILE.svg or -o FILE.png")
	}
	if err := safetext.CheckLine(*title); err != nil {
		return usagef("--title %s: %v", presets.QuoteShort(*title), err)
	}
	format := strings.TrimPrefix(strings.ToLower(filepath.Ext(*out)), ".")
	if format != "svg" && format != "png" {
		return usagef("-o %s: the extension %q is not .svg or .png", safetext.Line(*out), filepath.Ext(*out))
	}
	if err := checkOutput(*out, "o", *force); err != nil {
		return err
	}
	sz, err := figure.ParseSize(*size, *dpi)
	if err != nil {
		if *dpi < 50 || *dpi > 1200 {
			return usagef("--dpi %d: %v", *dpi, err)
		}
		return usagef("--size: %v", err)
	}
	sc, err := sel.resolve()
	if err != nil {
		return err
	}
	base, baseName, err := figureBaseline(&sel, sc, *baseline)
	if err != nil {
		return err
	}

	s := model.NewSolver()
	what, err := s.SteadyState(sc.Params, nil)
	if err != nil {
		return fmt.Errorf("what-if: %w", err)
	}
	fig := &figure.Figure{WhatIf: what.Beat}
	changes := paramChanges(base, sc.Params)
	if len(changes) > 0 {
		st, err := s.SteadyState(base, nil)
		if err != nil {
			return fmt.Errorf("baseline %s: %w", baseName, err)
		}
		fig.Baseline = st.Beat
		fig.Title = "What-if: " + summarize(changes) + "\nBaseline: " + baseName
	} else {
		fig.Title = "Scenario " + sc.Name
		if sc.Description != "" {
			fig.Title += ": " + sc.Description
		}
	}
	if *title != "" {
		fig.Title = *title
	}
	var buf bytes.Buffer
	if err := fig.Render(&buf, format, sz); err != nil {
		return err
	}
	if err := writeNew(*out, buf.Bytes(), *force); err != nil {
		return err
	}
	w, h := sz.Pixels()
	if format == "png" {
		fmt.Fprintf(env.Stderr, "wrote %s (%s, %d×%d px)\n", safetext.Line(*out), sz, w, h)
	} else {
		fmt.Fprintf(env.Stderr, "wrote %s (%s)\n", safetext.Line(*out), sz)
	}
	return nil
}

// figureBaseline returns the baseline parameters and their name: those of the
// --baseline scenario file (in the --circulation asked for, if any), else the
// scenario's own baseline, else the scenario without the --set changes.
func figureBaseline(sel *selection, sc *presets.Scenario, file string) (model.Params, string, error) {
	if file != "" {
		b, err := presets.LoadScenario(file)
		if err != nil {
			return model.Params{}, "", fmt.Errorf("--baseline: %w", err)
		}
		// --circulation moves the baseline too, so both loops run in the one asked for.
		if sel.circulation != "" {
			if err := b.SetCirculation(sc.Params.Circulation); err != nil {
				return model.Params{}, "", fmt.Errorf("--baseline: %w", err)
			}
		}
		return b.Params, "scenario " + b.Name + " (" + safetext.Line(filepath.Base(file)) + ")", nil
	}
	if sc.Baseline != nil {
		return *sc.Baseline, "baseline of scenario " + sc.Name, nil
	}
	plain := *sel
	plain.sets = nil
	orig, err := plain.resolve()
	if err != nil {
		return model.Params{}, "", err
	}
	return orig.Params, "scenario " + orig.Name + " without the --set changes", nil
}

// paramChange is one parameter that differs between baseline and what-if.
type paramChange struct {
	spec     model.Spec
	from, to float64
}

func paramChanges(base, what model.Params) []paramChange {
	var c []paramChange
	for _, s := range model.Specs {
		if a, b := s.Get(base), s.Get(what); a != b {
			c = append(c, paramChange{s, a, b})
		}
	}
	return c
}

// summarize lists the first changed parameters for a heading.
func summarize(c []paramChange) string {
	const shown = 2
	var parts []string
	for i, p := range c {
		if i == shown {
			parts = append(parts, fmt.Sprintf("and %d more", len(c)-shown))
			break
		}
		parts = append(parts, fmt.Sprintf("%s %s → %s %s", p.spec.Name, strconv.FormatFloat(p.from, 'g', -1, 64),
			strconv.FormatFloat(p.to, 'g', -1, 64), p.spec.Unit))
	}
	return strings.Join(parts, ", ")
}
