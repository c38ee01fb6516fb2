package sample

// Stream is a counter-based random stream: value k is Mix(key + k·γ), the
// SplitMix64 generator of Steele, Lea & Flood, "Fast splittable pseudorandom
// number generators", OOPSLA 2014. It is 16 bytes, used by value, and never
// allocates.
type Stream struct {
	key, ctr uint64
}

// golden is 2^64/φ, SplitMix64's increment γ.
const golden = 0x9E3779B97F4A7C15

// Mix is SplitMix64's output function (a variant of the MurmurHash3
// finalizer): a bijective hash of 64 bits, also used to spread work units.
func Mix(z uint64) uint64 {
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
	z = (z ^ (z >> 27)) * 0x94D049BB133111EB
	return z ^ (z >> 31)
}

// NewStream returns the stream of work unit (seed, emitter, batch).
// Distinct units get unrelated keys: each coordinate passes through the
// mixer before the next is added.
func NewStream(seed uint64, emitter, batch int64) Stream {
	k := Mix(seed + golden)
	k = Mix(k ^ uint64(emitter) + golden)
	k = Mix(k ^ uint64(batch) + 0x3C6EF372FE94F82A) // 2γ mod 2^64
	return Stream{key: k}
}

// Uint64 returns the next 64 random bits.
func (s *Stream) Uint64() uint64 {
	s.ctr++
	return Mix(s.key + s.ctr*golden)
}

// Float64 returns a uniform number in [0, 1) with 53 random bits.
func (s *Stream) Float64() float64 {
	return float64(s.Uint64()>>11) * 0x1p-53
}

// Skip advances the stream by n numbers in O(1): the counter is the state.
func (s *Stream) Skip(n uint64) { s.ctr += n }
