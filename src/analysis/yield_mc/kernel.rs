//! The hot loop of the yield (draw, evaluate, count a block at a time), compiled once for any
//! x86-64 or other processor and once more for processors with AVX2, picked at run time.
//!
//! Both builds run the same Rust code; the AVX2 one lets the compiler use four-lane vector
//! instructions and steps the four generators of a lane group with vector integer operations
//! ([`rng::Avx2Streams`]). Every figure is the same bit for bit: the integer steps are the same,
//! and each floating-point operation is one IEEE 754 operation rounded the same way in a scalar
//! or a vector register (Rust never fuses a multiply and an add unless told to, and no
//! `mul_add` is used here) [std IEEE 754-2008].

use std::ops::Range;

#[cfg(target_arch = "x86_64")]
use super::rng::Avx2Streams;
use super::rng::{Lanes, Streams};
use super::{Limits, Tally, CHUNK_BUILDS, LANES};
use crate::analysis::yield_mc::model::{Block, BuildModel, BLOCK};

/// Chunks the portable kernel steps together (without vector integer instructions the
/// compiler keeps each lane's state in general registers: two lanes fit, four spill).
const PORTABLE_LANES: usize = 2;

/// The instruction set the hot loop runs on.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Kernel {
    /// What every processor of the target has (on x86-64: SSE2).
    Portable,
    /// x86-64 with AVX2.
    #[cfg(target_arch = "x86_64")]
    Avx2,
}

impl Kernel {
    /// The fastest this processor can run.
    pub(super) fn detect() -> Kernel {
        #[cfg(target_arch = "x86_64")]
        if std::is_x86_feature_detected!("avx2") {
            return Kernel::Avx2;
        }
        Kernel::Portable
    }

    /// Every kernel this processor can run, the portable one first.
    #[cfg(test)]
    pub(super) fn available() -> Vec<Kernel> {
        let mut all = vec![Kernel::Portable];
        if Kernel::detect() != Kernel::Portable {
            all.push(Kernel::detect());
        }
        all
    }
}

/// One run's work: which chunks, of how many builds in all, from which seed.
pub(super) struct Work<'a> {
    pub(super) model: &'a BuildModel,
    pub(super) limits: &'a Limits,
    pub(super) seed: u64,
    /// Builds of the whole yield (the last chunk may be short).
    pub(super) total: u64,
    /// `report(builds)` after each chunk.
    pub(super) report: &'a (dyn Fn(u64) + Sync),
}

impl Tally {
    /// Draw, evaluate and count the chunks `chunks` on `kernel`.
    pub(super) fn run(&mut self, kernel: Kernel, work: &Work, chunks: Range<u64>) {
        match kernel {
            Kernel::Portable => self.run_portable(work, chunks),
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2 => {
                // SAFETY: `Kernel::Avx2` is only chosen where the processor has AVX2 (`detect`).
                unsafe { self.run_avx2(work, chunks) }
            }
        }
    }

    fn run_portable(&mut self, work: &Work, chunks: Range<u64>) {
        self.run_body(work, chunks, |seed, first| {
            Some(Streams::<PORTABLE_LANES>::of_chunks(seed, first))
        });
    }

    /// # Safety
    /// The processor must have AVX2.
    #[cfg(target_arch = "x86_64")]
    #[target_feature(enable = "avx2")]
    unsafe fn run_avx2(&mut self, work: &Work, chunks: Range<u64>) {
        self.run_body(work, chunks, |seed, first| {
            Avx2Streams::new(Streams::<LANES>::of_chunks(seed, first))
        });
    }

    /// Whole chunks `LANES` at a time from the generators `lanes(seed, first)` gives (stepped
    /// together), the rest (and a last, short chunk) one at a time. A chunk draws the same
    /// builds either way. Inlined into each kernel, so that each compiles it for its own
    /// instructions.
    #[inline(always)]
    fn run_body<const L: usize, S: Lanes<L>>(
        &mut self,
        work: &Work,
        chunks: Range<u64>,
        lanes: impl Fn(u64, u64) -> Option<S>,
    ) {
        let width = L as u64;
        let mut chunk = chunks.start;
        while chunk + width <= chunks.end && (chunk + width) * CHUNK_BUILDS <= work.total {
            match lanes(work.seed, chunk) {
                Some(mut streams) => {
                    let mut block = Block::default();
                    // Each block takes BLOCK / L builds of every chunk.
                    for _ in 0..CHUNK_BUILDS * width / BLOCK as u64 {
                        self.add_built(work, &mut streams, &mut block, BLOCK);
                    }
                    for _ in 0..L {
                        (work.report)(CHUNK_BUILDS);
                    }
                }
                None => break,
            }
            chunk += width;
        }
        for chunk in chunk..chunks.end {
            let start = chunk * CHUNK_BUILDS;
            let len = CHUNK_BUILDS.min(work.total.saturating_sub(start));
            let mut streams = Streams::<1>::of_chunks(work.seed, chunk);
            let mut block = Block::default();
            let mut left = len;
            while left > 0 {
                let n = usize::try_from(left).map_or(BLOCK, |l| l.min(BLOCK));
                self.add_built(work, &mut streams, &mut block, n);
                left -= n as u64;
            }
            (work.report)(len);
        }
    }

    /// Draw `n` builds into `block`, evaluate and count them.
    #[inline(always)]
    fn add_built<const L: usize>(
        &mut self,
        work: &Work,
        streams: &mut impl Lanes<L>,
        block: &mut Block,
        n: usize,
    ) {
        work.model.draw_block_lanes(streams, block, n);
        work.model.evaluate_block(block);
        self.add_block(block, work.limits);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::yield_mc::tests::relay_stage;

    /// Chunks drawn four at a time in lanes count the same builds as drawn one by one.
    #[test]
    fn lanes_and_single_chunks_count_the_same_builds() {
        let built =
            relay_stage(serde_json::json!({ "base_resistor_ohms": 4700, "pull_down_ohms": null }));
        let model = BuildModel::new(&built.y());
        let limits = Limits {
            target: 2.0,
            below_corner: 0.5,
        };
        let work = Work {
            model: &model,
            limits: &limits,
            seed: 21,
            total: 8 * CHUNK_BUILDS,
            report: &|_| {},
        };
        for kernel in Kernel::available() {
            let mut lanes = Tally::new(&model);
            lanes.run(kernel, &work, 0..8);
            let mut alone = Tally::new(&model);
            for chunk in 0..8 {
                // A run shorter than a lane group draws its chunks one at a time.
                alone.run(kernel, &work, chunk..chunk + 1);
            }
            assert_eq!(lanes.builds, 8 * CHUNK_BUILDS);
            assert_eq!(lanes.result(21), alone.result(21), "{kernel:?}");
            assert!(lanes.pinned > 0 && lanes.pinned < lanes.builds);
        }
    }
}
