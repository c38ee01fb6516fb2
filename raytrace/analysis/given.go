package analysis

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode"

	"github.com/hemiray/hemiray/raytrace"
	"github.com/hemiray/hemiray/raytrace/exchange"
	"github.com/hemiray/hemiray/raytrace/smooth"
)

// Given is one view factor read from a file: F from node From to node To
// ("ambient" for the surroundings).
type Given struct {
	From, To string
	F        float64
}

// maxGivenEntries bounds what ReadViewFactors keeps, so that a file cannot
// claim more memory than a 10⁴-node dense matrix needs.
const maxGivenEntries = 1 << 27

// ReadViewFactors reads view factors in either layout hemiray writes: a
// square matrix (header from,NODE,…[,ambient], a row per emitting node, as
// viewfactors.csv) or pairs (header from,to,F[,…], a row per non-zero
// factor, as viewfactors_pairs.csv; further columns are ignored). name is
// used in messages. Factors must be numbers in [0, 1].
func ReadViewFactors(r io.Reader, name string) ([]Given, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	head, err := cr.Read()
	if err != nil {
		return nil, fmt.Errorf("%s: no header line: %w", name, err)
	}
	head = slices.Clone(head)
	if len(head) > 0 {
		head[0] = strings.TrimPrefix(head[0], "\uFEFF") // a UTF-8 byte-order mark
	}
	if len(head) < 2 || head[0] != "from" {
		return nil, fmt.Errorf("%s:1: the header must start with \"from\" (a square matrix from,NODE,… or pairs from,to,F)", name)
	}
	pairs := len(head) >= 3 && head[1] == "to" && head[2] == "F"
	if !pairs {
		if err := plainNames(name, 1, head[1:]); err != nil {
			return nil, err
		}
	}
	var out []Given
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		if len(rec) == 1 && rec[0] == "" {
			continue
		}
		parse := func(s string) (float64, error) {
			f, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
			if err != nil || !(f >= 0 && f <= 1) {
				return 0, fmt.Errorf("%s:%d: %q is not a view factor in [0, 1]", name, line, s)
			}
			return f, nil
		}
		if pairs {
			if len(rec) < 3 {
				return nil, fmt.Errorf("%s:%d: a pair needs from, to and F", name, line)
			}
			if err := plainNames(name, line, rec[:2]); err != nil {
				return nil, err
			}
			f, err := parse(rec[2])
			if err != nil {
				return nil, err
			}
			out = append(out, Given{From: rec[0], To: rec[1], F: f})
		} else {
			if len(rec) != len(head) {
				return nil, fmt.Errorf("%s:%d: %d fields, the header has %d", name, line, len(rec), len(head))
			}
			if err := plainNames(name, line, rec[:1]); err != nil {
				return nil, err
			}
			for k, s := range rec[1:] {
				f, err := parse(s)
				if err != nil {
					return nil, err
				}
				if f > 0 {
					out = append(out, Given{From: rec[0], To: head[k+1], F: f})
				}
			}
			if !slices.ContainsFunc(out, func(g Given) bool { return g.From == rec[0] }) {
				out = append(out, Given{From: rec[0], To: rec[0], F: 0}) // a row of zeros still names its node
			}
		}
		if len(out) > maxGivenEntries {
			return nil, fmt.Errorf("%s: more than %d view factors", name, maxGivenEntries)
		}
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: no view factors", name)
	}
	return out, nil
}

// plainNames refuses node names holding control characters (a carriage
// return or line feed inside quotes, a tab): no mesh file can name a node
// so, and CSV readers disagree on how such a field reads back.
func plainNames(file string, line int, names []string) error {
	for _, s := range names {
		if strings.IndexFunc(s, unicode.IsControl) >= 0 {
			return fmt.Errorf("%s:%d: node name %q holds a control character", file, line, s)
		}
	}
	return nil
}

// givenScale is the number of rays every row is taken to have when given
// factors are smoothed: the maximum-likelihood smoothing depends on the
// counts only through their ratios when every row has the same number of
// rays, so a given matrix is smoothed with equal weight for every row, and
// rounding F·2⁴⁰ to whole counts changes F by at most 5·10⁻¹³.
const givenScale = 1 << 40

// AnalyseFactors smooths given view factors and solves the exchange with
// the case's conditions, as Analyse does for traced ones. Every node of the
// model needs a row; a model is open when some factor goes to "ambient".
// No intervals are computed (the factors carry none), and the smoothing's
// moves are reported as NaN standard errors.
func (in *Input) AnalyseFactors(given []Given) (*Result, error) {
	if in.Case == nil {
		return nil, fmt.Errorf("an exchange solve needs a case file with emissivities and conditions")
	}
	if in.Settings.Optics != nil {
		return nil, errors.New("the case follows rays through reflections (a specular or transmitting surface, or follow_reflections), which view factors cannot describe: trace it instead of giving view factors")
	}
	nodes, err := in.Nodes()
	if err != nil {
		return nil, err
	}
	index := make(map[string]int32, len(nodes))
	for i, n := range nodes {
		index[n.Name] = int32(i)
	}
	n := len(nodes)
	raw := make([]exchange.Row, n)
	rawAmb := make([]float64, n)
	seen := make([]bool, n)
	entries := make([][][2]float64, n) // (column, F) as read
	open := false
	for _, g := range given {
		i, ok := index[g.From]
		if !ok {
			return nil, fmt.Errorf("the view factors name a node %q the model does not have (its nodes: %s)", g.From, nodeList(nodes))
		}
		seen[i] = true
		if g.To == "ambient" {
			open = true
			rawAmb[i] += g.F
			continue
		}
		j, ok := index[g.To]
		if !ok {
			return nil, fmt.Errorf("the view factors name a node %q the model does not have (its nodes: %s)", g.To, nodeList(nodes))
		}
		if g.F > 0 {
			entries[i] = append(entries[i], [2]float64{float64(j), g.F})
		}
	}
	for i, ok := range seen {
		if !ok {
			return nil, fmt.Errorf("the view factors have no row for node %s", nodes[i].Name)
		}
	}
	c := smooth.Counts{Area: make([]float64, n), Rays: make([]int64, n), Hits: make([]smooth.CountRow, n)}
	if open {
		c.Ambient = make([]int64, n)
	}
	for i := range nodes {
		e := entries[i]
		slices.SortFunc(e, func(a, b [2]float64) int { return int(a[0]) - int(b[0]) })
		for k := range e {
			if k > 0 && e[k][0] == e[k-1][0] {
				return nil, fmt.Errorf("the view factor from %s to %s is given twice", nodes[i].Name, nodes[int(e[k][0])].Name)
			}
			raw[i].Append(int32(e[k][0]), e[k][1])
			c.Hits[i].Append(int32(e[k][0]), int64(math.Round(e[k][1]*givenScale)))
		}
		c.Area[i], c.Rays[i] = nodes[i].Area, givenScale
		if open {
			c.Ambient[i] = int64(math.Round(rawAmb[i] * givenScale))
		}
	}
	pooled := func() (*smooth.Result, error) {
		sm, err := smooth.Smooth(c)
		if err != nil {
			return nil, err
		}
		sm.ForgetCounts()
		for i := range sm.MovedAmbient {
			sm.MovedAmbient[i] = math.NaN()
		}
		sm.MaxMoved = math.NaN()
		return sm, nil
	}
	a, err := in.solve(nodes, pooled, nil, open, false, in.Settings.WithDefaults().Confidence)
	if err != nil {
		return nil, err
	}
	a.rawGiven, a.RawAmbient = raw, rawAmb
	if s := a.Smoothed.SummationBefore; s > 0.05 {
		a.Notes = append(a.Notes, fmt.Sprintf("the given view factors' rows sum to 1 only within %.2g: check that every node's row is complete (and the ambient column of an open model)", s))
	}
	return a, nil
}

func nodeList(nodes []raytrace.Node) string {
	var names []string
	for i, n := range nodes {
		if i == 12 {
			names = append(names, "…")
			break
		}
		names = append(names, n.Name)
	}
	return strings.Join(names, ", ")
}
