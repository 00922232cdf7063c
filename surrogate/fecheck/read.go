package fecheck

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// datBlock is one block of a ccx .dat file: a header such as
// "displacements (vx,vy,vz) for set RINGS and time 0.1E+01" and its rows
// (node id and values, or the values alone for TOTALS=ONLY).
type datBlock struct {
	kind string // "displacements", "forces", "total force", ...
	set  string
	rows [][]float64
}

// readDat parses the blocks of a .dat file in order.
func readDat(r io.Reader) ([]datBlock, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 1<<16), 1<<20)
	var out []datBlock
	var cur *datBlock
	line := 0
	for sc.Scan() {
		line++
		l := strings.TrimSpace(sc.Text())
		if l == "" {
			continue
		}
		if i := strings.Index(l, " for set "); i >= 0 {
			rest := l[i+len(" for set "):]
			set, _, _ := strings.Cut(rest, " ")
			kind := l[:i]
			if j := strings.Index(kind, " ("); j >= 0 {
				kind = kind[:j]
			}
			out = append(out, datBlock{kind: kind, set: set})
			cur = &out[len(out)-1]
			continue
		}
		if cur == nil {
			continue
		}
		f := strings.Fields(l)
		row := make([]float64, len(f))
		for k, s := range f {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				// a line that is not numbers ends the block (ccx writes
				// other sections, e.g. STEP headers, to the .dat file)
				cur = nil
				break
			}
			row[k] = v
		}
		if cur != nil {
			cur.rows = append(cur.rows, row)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf(".dat line %d: %w", line, err)
	}
	return out, nil
}

// frdResult holds what readFrd takes from a .frd file: node coordinates
// and, in file order, every strain block (node id → εxx, εyy, εzz, εxy,
// εyz, εzx).
type frdResult struct {
	nodes   map[int][3]float64
	strains []map[int][6]float64
}

// frdFields splits a fixed-width frd record " -1" + id (10) + values
// (12 each).
func frdFields(l string, n int) (int, []float64, error) {
	if len(l) < 13+12*n {
		return 0, nil, fmt.Errorf("short record %q", l)
	}
	id, err := strconv.Atoi(strings.TrimSpace(l[3:13]))
	if err != nil {
		return 0, nil, err
	}
	v := make([]float64, n)
	for k := 0; k < n; k++ {
		v[k], err = strconv.ParseFloat(strings.TrimSpace(l[13+12*k:25+12*k]), 64)
		if err != nil {
			return 0, nil, err
		}
	}
	return id, v, nil
}

// readFrd parses the ASCII .frd file: the node block (2C) and the strain
// result blocks (-4 records naming *STRAIN with six components).
func readFrd(r io.Reader) (*frdResult, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 1<<16), 1<<20)
	res := &frdResult{nodes: map[int][3]float64{}}
	const (
		none = iota
		nodes
		strain
		skip
	)
	state := none
	var cur map[int][6]float64
	line := 0
	for sc.Scan() {
		line++
		l := sc.Text()
		t := strings.TrimSpace(l)
		switch {
		case strings.HasPrefix(t, "2C"):
			state = nodes
			continue
		case strings.HasPrefix(t, "100C"):
			state = skip
			continue
		case strings.HasPrefix(t, "-4"):
			if f := strings.Fields(t); len(f) >= 2 && strings.HasSuffix(f[1], "STRAIN") {
				state = strain
				cur = map[int][6]float64{}
				res.strains = append(res.strains, cur)
			} else {
				state = skip
			}
			continue
		case t == "-3":
			state = none
			continue
		}
		if !strings.HasPrefix(l, " -1") {
			continue
		}
		switch state {
		case nodes:
			id, v, err := frdFields(l, 3)
			if err != nil {
				return nil, fmt.Errorf(".frd line %d: %v", line, err)
			}
			res.nodes[id] = [3]float64{v[0], v[1], v[2]}
		case strain:
			id, v, err := frdFields(l, 6)
			if err != nil {
				return nil, fmt.Errorf(".frd line %d: %v", line, err)
			}
			cur[id] = [6]float64{v[0], v[1], v[2], v[3], v[4], v[5]}
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf(".frd line %d: %w", line, err)
	}
	return res, nil
}
