package search

import (
	randv1 "math/rand"
	"math/rand/v2"
)

// Streams of the PCG generators derived from a run's seed. The model stream drives every random
// choice the search makes and is saved in checkpoints; the host stream only feeds eaopt's own
// generator (individual IDs, hall-of-fame clones), on which no output depends.
const (
	streamModel uint64 = 0x706c696361_01 // "plica" 1
	streamHost  uint64 = 0x706c696361_02 // "plica" 2
)

// newPCG returns the PCG generator of the given seed and stream.
func newPCG(seed, stream uint64) *rand.PCG { return rand.NewPCG(seed, stream) }

// source64 wraps a math/rand/v2 PCG as a math/rand (v1) Source64, so that v1 code draws from a
// generator whose state can be saved with MarshalBinary.
type source64 struct{ pcg *rand.PCG }

var _ randv1.Source64 = source64{}

// Uint64 returns the next value of the PCG.
func (s source64) Uint64() uint64 { return s.pcg.Uint64() }

// Int63 returns a non-negative 63-bit value: the top 63 bits of Uint64.
func (s source64) Int63() int64 { return int64(s.pcg.Uint64() >> 1) }

// Seed re-seeds the PCG with (seed, streamHost).
func (s source64) Seed(seed int64) { s.pcg.Seed(uint64(seed), streamHost) }
