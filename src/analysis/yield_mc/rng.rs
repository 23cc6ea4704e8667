//! The random streams: one xoshiro256++ generator per chunk of builds, seeded from (seed, chunk
//! index) through SplitMix64, so a chunk draws the same numbers whichever thread runs it.
// Indexing reviewed by hand for the no-panic rule (src/lib.rs): the only indices run over the
// lanes of fixed-size arrays, `0..L`.
#![allow(clippy::indexing_slicing)]

use rand_xoshiro::rand_core::SeedableRng;
use rand_xoshiro::Xoshiro256PlusPlus;

/// Golden-ratio increment of SplitMix64 [text: Steele, Lea and Flood, "Fast splittable
/// pseudorandom number generators", OOPSLA 2014; constants as in Vigna's splitmix64.c, from
/// memory].
const GOLDEN_GAMMA: u64 = 0x9E37_79B9_7F4A_7C15;

/// One SplitMix64 step: advance `state` and return the mixed output (same source as above).
#[inline]
pub fn splitmix64(state: &mut u64) -> u64 {
    *state = state.wrapping_add(GOLDEN_GAMMA);
    let mut z = *state;
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// The generator of one chunk. The chunk index is spread by an odd multiplier (a bijection), so
/// two chunks of one run never share a SplitMix64 start; the four SplitMix64 outputs fill the
/// xoshiro state (the seeding xoshiro's authors recommend, from memory), and four consecutive
/// outputs are never all zero.
pub fn chunk_rng(seed: u64, chunk: u64) -> Xoshiro256PlusPlus {
    let mut bytes = [0u8; 32];
    for (word, s) in bytes.chunks_exact_mut(8).zip(chunk_state(seed, chunk)) {
        word.copy_from_slice(&s.to_le_bytes());
    }
    Xoshiro256PlusPlus::from_seed(bytes)
}

/// The xoshiro256++ state of chunk `chunk` (the words [`chunk_rng`] seeds its generator with).
pub fn chunk_state(seed: u64, chunk: u64) -> [u64; 4] {
    let mut state = seed ^ chunk.wrapping_mul(GOLDEN_GAMMA);
    [(); 4].map(|_| splitmix64(&mut state))
}

/// `L` xoshiro256++ generators stepped together, one a lane, kept word by word across the lanes
/// so that the compiler holds each state word of every lane in one vector register: lane `l`
/// gives exactly the stream of its own generator, `L` streams for about the instructions of
/// one. The step is xoshiro256++ as its authors define it [text: D. Blackman and S. Vigna,
/// "Scrambled linear pseudorandom number generators", ACM TOMS 47 (2021); the rotations 23 and
/// 45 and the shift 17, from memory; the tests below check the stream against rand_xoshiro's].
#[derive(Clone, Debug)]
pub struct Streams<const L: usize> {
    /// State word `i` of every lane.
    s: [[u64; L]; 4],
}

impl<const L: usize> Streams<L> {
    /// Lane `l` draws the stream of chunk `first + l`.
    pub fn of_chunks(seed: u64, first: u64) -> Streams<L> {
        let mut s = [[0u64; L]; 4];
        for (lane, chunk) in (first..).take(L).enumerate() {
            for (word, value) in s.iter_mut().zip(chunk_state(seed, chunk)) {
                if let Some(w) = word.get_mut(lane) {
                    *w = value;
                }
            }
        }
        Streams { s }
    }

    /// The next output of every lane.
    #[inline(always)]
    pub fn next_all(&mut self) -> [u64; L] {
        let [s0, s1, s2, s3] = &mut self.s;
        let mut out = [0u64; L];
        for l in 0..L {
            out[l] = s0[l]
                .wrapping_add(s3[l])
                .rotate_left(23)
                .wrapping_add(s0[l]);
            let t = s1[l] << 17;
            s2[l] ^= s0[l];
            s3[l] ^= s1[l];
            s1[l] ^= s2[l];
            s0[l] ^= s3[l];
            s2[l] ^= t;
            s3[l] = s3[l].rotate_left(45);
        }
        out
    }
}

/// A source of draws for `L` builds at a time: each call gives the next output of every lane.
pub trait Lanes<const L: usize> {
    /// The next output of every lane.
    fn next(&mut self) -> [u64; L];

    /// `steps` steps of `R` outputs a lane: output `r` of step `s` goes to
    /// `rows[r][L s .. L s + L]`, in the order `next` would give them (at most `N / L` steps).
    #[inline(always)]
    fn fill<const N: usize, const R: usize>(&mut self, rows: &mut [[u64; N]; R], steps: usize) {
        for step in 0..steps.min(N / L.max(1)) {
            for row in rows.iter_mut() {
                row[step * L..step * L + L].copy_from_slice(&self.next());
            }
        }
    }
}

impl<const L: usize> Lanes<L> for Streams<L> {
    #[inline(always)]
    fn next(&mut self) -> [u64; L] {
        self.next_all()
    }
}

#[cfg(target_arch = "x86_64")]
pub use avx2::Avx2Streams;

/// Four streams stepped with AVX2 vector instructions: the same outputs as [`Streams<4>`] (the
/// same integer operations, four lanes to a register), made [`avx2::BUFFER`] at a time.
#[cfg(target_arch = "x86_64")]
mod avx2 {
    use super::{Lanes, Streams};
    use std::arch::x86_64::{
        __m256i, _mm256_add_epi64, _mm256_loadu_si256, _mm256_or_si256, _mm256_slli_epi64,
        _mm256_srli_epi64, _mm256_storeu_si256, _mm256_xor_si256,
    };

    /// Outputs a lane made at a time. Every chunk takes a multiple of this many (its builds, a
    /// multiple of 64, times its outputs a build), so no output is made that its chunk does not
    /// take.
    pub(super) const BUFFER: usize = 64;

    /// [`Streams<4>`] on AVX2, with outputs made ahead in a buffer.
    #[derive(Clone, Debug)]
    pub struct Avx2Streams {
        streams: Streams<4>,
        buffer: [[u64; 4]; BUFFER],
        taken: usize,
    }

    impl Avx2Streams {
        /// The same streams stepped on AVX2; `None` when the processor has no AVX2.
        pub fn new(streams: Streams<4>) -> Option<Avx2Streams> {
            std::is_x86_feature_detected!("avx2").then_some(Avx2Streams {
                streams,
                buffer: [[0; 4]; BUFFER],
                taken: BUFFER,
            })
        }

        /// The streams, stepped past every output made so far (taken or not).
        pub fn into_streams(self) -> Streams<4> {
            self.streams
        }
    }

    impl Lanes<4> for Avx2Streams {
        #[inline(always)]
        fn next(&mut self) -> [u64; 4] {
            if self.taken >= BUFFER {
                // SAFETY: an `Avx2Streams` exists only where the processor has AVX2 (`new`
                // checks), so the AVX2 instructions of `fill` can run.
                unsafe { fill(&mut self.streams.s, &mut self.buffer) };
                self.taken = 0;
            }
            let out = self.buffer.get(self.taken).copied().unwrap_or_default();
            self.taken += 1;
            out
        }

        #[inline(always)]
        fn fill<const N: usize, const R: usize>(&mut self, rows: &mut [[u64; N]; R], steps: usize) {
            if self.taken < BUFFER {
                // Outputs made ahead come first: one by one.
                for step in 0..steps.min(N / 4) {
                    for row in rows.iter_mut() {
                        row[step * 4..step * 4 + 4].copy_from_slice(&self.next());
                    }
                }
            } else {
                // SAFETY: as in `next`.
                unsafe { fill_rows(&mut self.streams.s, rows, steps) };
            }
        }
    }

    /// As [`Lanes::fill`], straight from the state `s` of the four lanes.
    ///
    /// # Safety
    /// The processor must have AVX2.
    #[target_feature(enable = "avx2")]
    unsafe fn fill_rows<const N: usize, const R: usize>(
        s: &mut [[u64; 4]; 4],
        rows: &mut [[u64; N]; R],
        steps: usize,
    ) {
        let [w0, w1, w2, w3] = s;
        let mut s0 = _mm256_loadu_si256(w0.as_ptr().cast::<__m256i>());
        let mut s1 = _mm256_loadu_si256(w1.as_ptr().cast::<__m256i>());
        let mut s2 = _mm256_loadu_si256(w2.as_ptr().cast::<__m256i>());
        let mut s3 = _mm256_loadu_si256(w3.as_ptr().cast::<__m256i>());
        for step in 0..steps.min(N / 4) {
            for row in rows.iter_mut() {
                let sum = _mm256_add_epi64(s0, s3);
                let rot = _mm256_or_si256(_mm256_slli_epi64(sum, 23), _mm256_srli_epi64(sum, 41));
                let out = _mm256_add_epi64(rot, s0);
                // Four u64 at `4 step` (inside the row: step < N / 4).
                if let Some(dst) = row.get_mut(step * 4..step * 4 + 4) {
                    _mm256_storeu_si256(dst.as_mut_ptr().cast::<__m256i>(), out);
                }
                let t = _mm256_slli_epi64(s1, 17);
                s2 = _mm256_xor_si256(s2, s0);
                s3 = _mm256_xor_si256(s3, s1);
                s1 = _mm256_xor_si256(s1, s2);
                s0 = _mm256_xor_si256(s0, s3);
                s2 = _mm256_xor_si256(s2, t);
                s3 = _mm256_or_si256(_mm256_slli_epi64(s3, 45), _mm256_srli_epi64(s3, 19));
            }
        }
        _mm256_storeu_si256(w0.as_mut_ptr().cast::<__m256i>(), s0);
        _mm256_storeu_si256(w1.as_mut_ptr().cast::<__m256i>(), s1);
        _mm256_storeu_si256(w2.as_mut_ptr().cast::<__m256i>(), s2);
        _mm256_storeu_si256(w3.as_mut_ptr().cast::<__m256i>(), s3);
    }

    /// Step the four lanes of `s` once for every entry of `out`, writing each step's outputs.
    /// The xoshiro256++ step of [`Streams::next_all`], lane for lane.
    ///
    /// # Safety
    /// The processor must have AVX2.
    #[target_feature(enable = "avx2")]
    unsafe fn fill(s: &mut [[u64; 4]; 4], out: &mut [[u64; 4]]) {
        // Unaligned loads and stores of four u64 from and to arrays of four u64: every pointer
        // below comes from a reference to such an array.
        let [w0, w1, w2, w3] = s;
        let mut s0 = _mm256_loadu_si256(w0.as_ptr().cast::<__m256i>());
        let mut s1 = _mm256_loadu_si256(w1.as_ptr().cast::<__m256i>());
        let mut s2 = _mm256_loadu_si256(w2.as_ptr().cast::<__m256i>());
        let mut s3 = _mm256_loadu_si256(w3.as_ptr().cast::<__m256i>());
        for o in out.iter_mut() {
            // rotl(s0 + s3, 23) + s0
            let sum = _mm256_add_epi64(s0, s3);
            let rot = _mm256_or_si256(_mm256_slli_epi64(sum, 23), _mm256_srli_epi64(sum, 41));
            _mm256_storeu_si256(o.as_mut_ptr().cast::<__m256i>(), _mm256_add_epi64(rot, s0));
            let t = _mm256_slli_epi64(s1, 17);
            s2 = _mm256_xor_si256(s2, s0);
            s3 = _mm256_xor_si256(s3, s1);
            s1 = _mm256_xor_si256(s1, s2);
            s0 = _mm256_xor_si256(s0, s3);
            s2 = _mm256_xor_si256(s2, t);
            // rotl(s3, 45)
            s3 = _mm256_or_si256(_mm256_slli_epi64(s3, 45), _mm256_srli_epi64(s3, 19));
        }
        _mm256_storeu_si256(w0.as_mut_ptr().cast::<__m256i>(), s0);
        _mm256_storeu_si256(w1.as_mut_ptr().cast::<__m256i>(), s1);
        _mm256_storeu_si256(w2.as_mut_ptr().cast::<__m256i>(), s2);
        _mm256_storeu_si256(w3.as_mut_ptr().cast::<__m256i>(), s3);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand_xoshiro::rand_core::RngCore;
    use rand_xoshiro::SplitMix64;

    #[test]
    fn splitmix_matches_the_reference_stream() {
        // rand_xoshiro's SplitMix64 is tested there against Vigna's reference splitmix64.c; ours
        // must give the same stream for the same starting state.
        for start in [0u64, 1, 0xDEAD_BEEF, u64::MAX] {
            let mut ours = start;
            let mut theirs = SplitMix64::seed_from_u64(start);
            for _ in 0..8 {
                assert_eq!(splitmix64(&mut ours), theirs.next_u64());
            }
        }
        // From memory: the first output from state 0 is 0xE220A8397B1DCDAF.
        let mut zero = 0u64;
        assert_eq!(splitmix64(&mut zero), 0xE220_A839_7B1D_CDAF);
    }

    #[test]
    fn chunks_get_distinct_streams_and_repeat_for_the_same_key() {
        let first: Vec<u64> = (0..4).map(|c| chunk_rng(7, c).next_u64()).collect();
        let again: Vec<u64> = (0..4).map(|c| chunk_rng(7, c).next_u64()).collect();
        assert_eq!(first, again);
        for i in 0..first.len() {
            for j in i + 1..first.len() {
                assert_ne!(first[i], first[j]);
            }
        }
        assert_ne!(chunk_rng(8, 0).next_u64(), first[0]);
    }

    #[test]
    fn each_lane_draws_its_chunks_stream() {
        fn check<const L: usize>(seed: u64, first: u64) {
            let mut lanes = Streams::<L>::of_chunks(seed, first);
            let mut alone: Vec<_> = (0..L as u64).map(|l| chunk_rng(seed, first + l)).collect();
            for _ in 0..1000 {
                let out = lanes.next_all();
                for (got, rng) in out.iter().zip(alone.iter_mut()) {
                    assert_eq!(*got, rng.next_u64());
                }
            }
        }
        check::<1>(7, 0);
        check::<4>(7, 12);
        check::<8>(u64::MAX, 3);
    }

    #[cfg(target_arch = "x86_64")]
    #[test]
    fn avx2_lanes_draw_the_same_streams() {
        let Some(mut fast) = Avx2Streams::new(Streams::<4>::of_chunks(5, 40)) else {
            eprintln!("no AVX2 on this processor: nothing to compare");
            return;
        };
        let mut plain = Streams::<4>::of_chunks(5, 40);
        for _ in 0..3 * avx2::BUFFER + 1 {
            assert_eq!(fast.next(), plain.next());
        }
        // Filling rows: first from what was made ahead, then straight from the state.
        for _ in 0..3 {
            let mut rows = [[0u64; 64]; 4];
            let mut want = [[0u64; 64]; 4];
            fast.fill(&mut rows, 16);
            plain.fill(&mut want, 16);
            assert_eq!(rows, want);
        }
        assert_eq!(fast.next(), plain.next());
    }
}
