package results

import (
	"encoding/json"
	"fmt"
	"strconv"

	"plica/objective"
	"plica/search"
)

// diagnosisStateKey is the key under which a checkpoint file keeps what
// the diagnosis has gathered so far (search's Diagnoser and the
// explainer), so that a resumed run diagnoses all of its evaluations, as
// the uninterrupted run would. Checkpoints written before it have none.
const diagnosisStateKey = "diagnosis_state"

// dfloat is a float64 written exactly in JSON, NaN and ±Inf as strings
// (the checkpoint's own number type).
type dfloat = search.JSONFloat

func dfloats(v []float64) []dfloat {
	out := make([]dfloat, len(v))
	for i, x := range v {
		out[i] = dfloat(x)
	}
	return out
}

func floats(v []dfloat) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = float64(x)
	}
	return out
}

type stateStat struct {
	Violating         int64  `json:"violating"`
	SmallestViolation dfloat `json:"smallest_violation"`
	Best              dfloat `json:"best"`
}

type stateDesign struct {
	Index int64    `json:"index"`
	CV    dfloat   `json:"cv"`
	X     []dfloat `json:"x"`
	F     []dfloat `json:"f"`
	G     []dfloat `json:"g"`
}

type stateReach struct {
	Reach dfloat `json:"reach_m"`
	Index int64  `json:"index"`
	OK    bool   `json:"ok"`
}

type stateCheck struct {
	Name  string `json:"name"`
	Value dfloat `json:"value"`
	Limit dfloat `json:"limit"`
	Unit  string `json:"unit"`
	Max   bool   `json:"max"`
	Pass  bool   `json:"pass"`
	Warn  bool   `json:"warn"`
	Note  string `json:"note"`
	Index int64  `json:"index"`
	OK    bool   `json:"ok"`
}

type stateExplainer struct {
	ReachAll     stateReach       `json:"reach_all"`
	ReachMeeting []stateReach     `json:"reach_meeting"`
	ReachOthers  stateReach       `json:"reach_others"`
	Best         []stateCheck     `json:"best"`
	Evals        int64            `json:"evaluations"`
	Misordered   map[string]int64 `json:"misordered"`
}

// diagnosisState is the checkpoint's diagnosis_state.
type diagnosisState struct {
	Evaluations int64           `json:"evaluations"`
	Feasible    int64           `json:"feasible"`
	Stats       []stateStat     `json:"constraints"`
	Least       []stateDesign   `json:"least_infeasible"`
	Explainer   *stateExplainer `json:"explainer,omitempty"`
}

func toStateReach(r reachRecord) stateReach {
	return stateReach{Reach: dfloat(r.Reach), Index: r.Index, OK: r.OK}
}

func fromStateReach(r stateReach) reachRecord {
	return reachRecord{Reach: float64(r.Reach), Index: r.Index, OK: r.OK}
}

// saveDiagnosis captures g and ex (ex may be nil).
func saveDiagnosis(g *search.Diagnoser, ex *explainer) *diagnosisState {
	st := &diagnosisState{Evaluations: g.Evaluations, Feasible: g.Feasible, Stats: []stateStat{}, Least: []stateDesign{}}
	for _, s := range g.Stats {
		st.Stats = append(st.Stats, stateStat{s.Violating, dfloat(s.SmallestViolation), dfloat(s.Best)})
	}
	for _, d := range g.Least {
		st.Least = append(st.Least, stateDesign{Index: d.Index, CV: dfloat(d.CV), X: dfloats(d.X), F: dfloats(d.F), G: dfloats(d.G)})
	}
	if ex != nil {
		ex.mu.Lock()
		defer ex.mu.Unlock()
		e := &stateExplainer{ReachAll: toStateReach(ex.reachAll), ReachOthers: toStateReach(ex.reachOthers),
			ReachMeeting: []stateReach{}, Best: []stateCheck{}, Evals: ex.evals, Misordered: map[string]int64{}}
		for _, r := range ex.reachMeeting {
			e.ReachMeeting = append(e.ReachMeeting, toStateReach(r))
		}
		for _, b := range ex.best {
			c := b.Check
			e.Best = append(e.Best, stateCheck{Name: c.Name, Value: dfloat(c.Value), Limit: dfloat(c.Limit), Unit: c.Unit, Max: c.Max,
				Pass: c.Pass, Warn: c.Warn, Note: c.Note, Index: b.Index, OK: b.OK})
		}
		for i, n := range ex.misordered {
			e.Misordered[strconv.Itoa(i)] = n
		}
		st.Explainer = e
	}
	return st
}

// restore loads the state into g and ex; an error when it does not fit
// the problem (other constraint or check counts).
func (st *diagnosisState) restore(g *search.Diagnoser, ex *explainer, numConstraints int) error {
	if len(st.Stats) != 0 && len(st.Stats) != numConstraints {
		return fmt.Errorf("%d constraints in the saved diagnosis, the problem has %d", len(st.Stats), numConstraints)
	}
	if ex != nil && st.Explainer != nil && (len(st.Explainer.ReachMeeting) != len(ex.reachMeeting) || len(st.Explainer.Best) != len(ex.best)) {
		return fmt.Errorf("the saved diagnosis has %d constraints and %d checks, the problem %d and %d",
			len(st.Explainer.ReachMeeting), len(st.Explainer.Best), len(ex.reachMeeting), len(ex.best))
	}
	g.Evaluations, g.Feasible = st.Evaluations, st.Feasible
	g.Stats, g.Least = nil, nil
	for _, s := range st.Stats {
		g.Stats = append(g.Stats, search.ConstraintStat{Violating: s.Violating, SmallestViolation: float64(s.SmallestViolation), Best: float64(s.Best)})
	}
	for _, d := range st.Least {
		g.Least = append(g.Least, search.Design{Index: d.Index, CV: float64(d.CV), X: floats(d.X), F: floats(d.F), G: floats(d.G)})
	}
	if ex == nil || st.Explainer == nil {
		return nil
	}
	e := st.Explainer
	ex.mu.Lock()
	defer ex.mu.Unlock()
	ex.reachAll, ex.reachOthers, ex.evals = fromStateReach(e.ReachAll), fromStateReach(e.ReachOthers), e.Evals
	for j, r := range e.ReachMeeting {
		ex.reachMeeting[j] = fromStateReach(r)
	}
	for j, b := range e.Best {
		ex.best[j] = checkRecord{Check: objective.Check{Name: b.Name, Value: float64(b.Value), Limit: float64(b.Limit), Unit: b.Unit,
			Max: b.Max, Pass: b.Pass, Warn: b.Warn, Note: b.Note}, Index: b.Index, OK: b.OK}
	}
	ex.misordered = nil
	for k, n := range e.Misordered {
		i, err := strconv.Atoi(k)
		if err != nil {
			return fmt.Errorf("saved diagnosis: bellows pair %q is not a number", k)
		}
		if ex.misordered == nil {
			ex.misordered = map[int]int64{}
		}
		ex.misordered[i] = n
	}
	return nil
}

// checkpointWithDiagnosis is the checkpoint's JSON with the diagnosis
// state added under diagnosisStateKey (search.Checkpoint ignores the key
// when it reads the file back).
func checkpointWithDiagnosis(c *search.Checkpoint, st *diagnosisState) ([]byte, error) {
	b, err := json.Marshal(c)
	if err != nil {
		return nil, err
	}
	if st == nil {
		return b, nil
	}
	s, err := json.Marshal(st)
	if err != nil {
		return nil, err
	}
	if len(b) < 2 || b[len(b)-1] != '}' {
		return nil, fmt.Errorf("checkpoint JSON is not an object")
	}
	out := append(b[:len(b)-1:len(b)-1], []byte(`,"`+diagnosisStateKey+`":`)...)
	out = append(out, s...)
	return append(out, '}'), nil
}

// readDiagnosisState reads the diagnosis state of a checkpoint file's
// bytes; nil when it has none (written before the state was saved).
func readDiagnosisState(b []byte) (*diagnosisState, error) {
	var w struct {
		State *diagnosisState `json:"diagnosis_state"`
	}
	if err := json.Unmarshal(b, &w); err != nil {
		return nil, err
	}
	return w.State, nil
}
