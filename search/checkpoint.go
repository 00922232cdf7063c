package search

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"time"
)

// CheckpointVersion is the version of the Checkpoint layout written by this package.
const CheckpointVersion = 1

// Checkpoint is the state of a population run after a complete generation. Resuming from it
// (Settings.Resume) reaches exactly the same result as the uninterrupted run with the same
// settings. It marshals to JSON with every float kept exactly; NaN and ±Inf are written as the
// strings "NaN", "+Inf" and "-Inf".
type Checkpoint struct {
	// Version is CheckpointVersion.
	Version int
	// Method is the method name ("NSGA2" or "GA").
	Method string
	// ConfigHash is Settings.ConfigHash of the run.
	ConfigHash string
	// Seed is Settings.Seed of the run.
	Seed uint64
	// RNG is the state of the run's PCG generator (MarshalBinary).
	RNG []byte
	// Stats are the counters after the saved generation.
	Stats
	// Elapsed is the wall-clock time so far.
	Elapsed time.Duration
	// Reference is the hypervolume reference point in use (nil if not yet fixed).
	Reference []float64
	// History is Result.History so far.
	History []Stats
	// Population holds the designs of the population, with ranks and crowding distances.
	Population []Design
	// Archive holds the archive in its internal order.
	Archive []Design
}

// JSONFloat is a float64 that marshals exactly, with NaN and ±Inf as strings
// (checkpoints, and the diagnosis state results keeps in them).
type JSONFloat float64

func (f JSONFloat) MarshalJSON() ([]byte, error) {
	v := float64(f)
	switch {
	case math.IsNaN(v):
		return []byte(`"NaN"`), nil
	case math.IsInf(v, 1):
		return []byte(`"+Inf"`), nil
	case math.IsInf(v, -1):
		return []byte(`"-Inf"`), nil
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

func (f *JSONFloat) UnmarshalJSON(b []byte) error {
	s := string(b)
	switch s {
	case `"NaN"`:
		*f = JSONFloat(math.NaN())
		return nil
	case `"+Inf"`:
		*f = JSONFloat(math.Inf(1))
		return nil
	case `"-Inf"`:
		*f = JSONFloat(math.Inf(-1))
		return nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return fmt.Errorf("search: checkpoint number %s: %w", s, err)
	}
	*f = JSONFloat(v)
	return nil
}

func toJSON(v []float64) []JSONFloat {
	if v == nil {
		return nil
	}
	out := make([]JSONFloat, len(v))
	for i, x := range v {
		out[i] = JSONFloat(x)
	}
	return out
}

func fromJSON(v []JSONFloat) []float64 {
	if v == nil {
		return nil
	}
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = float64(x)
	}
	return out
}

type wireDesign struct {
	Index    int64       `json:"index"`
	X        []JSONFloat `json:"x"`
	F        []JSONFloat `json:"f"`
	G        []JSONFloat `json:"g"`
	CV       JSONFloat   `json:"cv"`
	Failed   string      `json:"failed,omitempty"`
	Rank     int         `json:"rank"`
	Crowding JSONFloat   `json:"crowding"`
	Scalar   JSONFloat   `json:"scalar"`
}

type wireStats struct {
	Generation  int       `json:"generation"`
	Evaluations int64     `json:"evaluations"`
	Failures    int64     `json:"failures"`
	Feasible    int       `json:"feasible"`
	ArchiveSize int       `json:"archive_size"`
	Hypervolume JSONFloat `json:"hypervolume"`
}

type wireCheckpoint struct {
	Version    int          `json:"version"`
	Method     string       `json:"method"`
	ConfigHash string       `json:"config_hash"`
	Seed       uint64       `json:"seed"`
	RNG        []byte       `json:"rng_state"`
	Stats      wireStats    `json:"stats"`
	ElapsedNS  int64        `json:"elapsed_ns"`
	Reference  []JSONFloat  `json:"reference"`
	History    []wireStats  `json:"history"`
	Population []wireDesign `json:"population"`
	Archive    []wireDesign `json:"archive"`
}

func statsToWire(s Stats) wireStats {
	return wireStats{s.Generation, s.Evaluations, s.Failures, s.Feasible, s.ArchiveSize, JSONFloat(s.Hypervolume)}
}

func statsFromWire(w wireStats) Stats {
	return Stats{w.Generation, w.Evaluations, w.Failures, w.Feasible, w.ArchiveSize, float64(w.Hypervolume)}
}

func designsToWire(ds []Design) []wireDesign {
	out := make([]wireDesign, len(ds))
	for i, d := range ds {
		out[i] = wireDesign{d.Index, toJSON(d.X), toJSON(d.F), toJSON(d.G), JSONFloat(d.CV), d.Failed,
			d.Rank, JSONFloat(d.Crowding), JSONFloat(d.Scalar)}
	}
	return out
}

func designsFromWire(ws []wireDesign) []Design {
	out := make([]Design, len(ws))
	for i, w := range ws {
		out[i] = Design{Index: w.Index, X: fromJSON(w.X), F: fromJSON(w.F), G: fromJSON(w.G), CV: float64(w.CV),
			Failed: w.Failed, Rank: w.Rank, Crowding: float64(w.Crowding), Scalar: float64(w.Scalar)}
		if out[i].G == nil {
			out[i].G = []float64{}
		}
	}
	return out
}

// MarshalJSON encodes c with snake_case keys; floats round-trip exactly.
func (c *Checkpoint) MarshalJSON() ([]byte, error) {
	w := wireCheckpoint{
		Version: c.Version, Method: c.Method, ConfigHash: c.ConfigHash, Seed: c.Seed, RNG: c.RNG,
		Stats: statsToWire(c.Stats), ElapsedNS: int64(c.Elapsed), Reference: toJSON(c.Reference),
		Population: designsToWire(c.Population), Archive: designsToWire(c.Archive),
	}
	w.History = make([]wireStats, len(c.History))
	for i, s := range c.History {
		w.History[i] = statsToWire(s)
	}
	return json.Marshal(w)
}

// UnmarshalJSON decodes a checkpoint written by MarshalJSON and checks its version.
func (c *Checkpoint) UnmarshalJSON(b []byte) error {
	var w wireCheckpoint
	if err := json.Unmarshal(b, &w); err != nil {
		return fmt.Errorf("search: checkpoint: %w", err)
	}
	if w.Version != CheckpointVersion {
		return fmt.Errorf("search: checkpoint version %d, want %d", w.Version, CheckpointVersion)
	}
	*c = Checkpoint{
		Version: w.Version, Method: w.Method, ConfigHash: w.ConfigHash, Seed: w.Seed, RNG: w.RNG,
		Stats: statsFromWire(w.Stats), Elapsed: time.Duration(w.ElapsedNS), Reference: fromJSON(w.Reference),
		Population: designsFromWire(w.Population), Archive: designsFromWire(w.Archive),
	}
	c.History = make([]Stats, len(w.History))
	for i, s := range w.History {
		c.History[i] = statsFromWire(s)
	}
	return nil
}
