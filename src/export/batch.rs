//! Line batches on every core: blocks of input lines are written by worker threads, each with
//! its own state (a writer's per-species memo), and put out in input order, so the output does
//! not depend on how the lines were split or on the number of threads.

use std::collections::BTreeMap;
use std::io::{self, Write};
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::{Condvar, Mutex, mpsc};

/// Lines per block a worker takes at a time: large enough that handing blocks over costs
/// nothing measurable, small enough that the cores stay busy to the end.
const BLOCK_LINES: usize = 512;
/// Fewer lines than this are written on the calling thread (starting workers would cost more
/// than they save).
pub const PARALLEL_FROM_LINES: usize = 2048;
/// How many blocks the workers may run ahead of the block being put out, per worker: bounds
/// the memory held for output that must wait for a slow block before it.
const AHEAD_PER_WORKER: usize = 4;

/// Workers a batch uses: the available cores, at most eight.
pub fn default_threads() -> usize {
    std::thread::available_parallelism().map_or(1, |n| n.get().min(8))
}

/// The lines of a batch as (input line number from 1, trimmed text), blank lines and `#`
/// comments left out.
pub fn batch_lines(text: &str) -> Vec<(usize, &str)> {
    text.lines()
        .enumerate()
        .map(|(index, line)| (index + 1, line.trim()))
        .filter(|(_, line)| !line.is_empty() && !line.starts_with('#'))
        .collect()
}

/// Writes `lines` (input line number, text) to `out` through `write`, which appends one line's
/// output to a buffer and says whether the line succeeded, with a state of `new_state` per
/// thread. Uses up to `threads` workers when there are enough lines, the calling thread
/// otherwise. Returns whether every line succeeded; the first error of `out` stops the batch.
pub fn write_in_order<S>(
    lines: &[(usize, &str)],
    threads: usize,
    out: &mut dyn Write,
    new_state: impl Fn() -> S + Sync,
    write: impl Fn(&mut S, usize, &str, &mut Vec<u8>) -> bool + Sync,
) -> io::Result<bool> {
    if threads <= 1 || lines.len() < PARALLEL_FROM_LINES {
        let mut state = new_state();
        let mut buffer = Vec::with_capacity(1 << 16);
        let mut all = true;
        for &(number, line) in lines {
            all &= write(&mut state, number, line, &mut buffer);
            // Whole lines only, a block at a time: one write per block, not per line.
            if buffer.len() >= 1 << 15 {
                out.write_all(&buffer)?;
                buffer.clear();
            }
        }
        out.write_all(&buffer)?;
        return Ok(all);
    }
    let blocks: Vec<&[(usize, &str)]> = lines.chunks(BLOCK_LINES).collect();
    let ahead = AHEAD_PER_WORKER * threads;
    let next = AtomicUsize::new(0);
    // Blocks put out so far, for workers waiting not to run too far ahead.
    let written = (Mutex::new(0usize), Condvar::new());
    let stop = AtomicBool::new(false);
    let (sender, receiver) = mpsc::sync_channel::<(usize, Vec<u8>, bool)>(threads);
    std::thread::scope(|scope| {
        for _ in 0..threads {
            let sender = sender.clone();
            let (blocks, next, written, stop) = (&blocks, &next, &written, &stop);
            let (new_state, write) = (&new_state, &write);
            scope.spawn(move || {
                // A worker that panics must not leave the others waiting for its block.
                let _guard = StopOnPanic { stop, written };
                let mut state = new_state();
                loop {
                    let block = next.fetch_add(1, Ordering::Relaxed);
                    if block >= blocks.len() {
                        break;
                    }
                    let mut done = written.0.lock().unwrap_or_else(|e| e.into_inner());
                    while block >= *done + ahead && !stop.load(Ordering::Relaxed) {
                        done = written.1.wait(done).unwrap_or_else(|e| e.into_inner());
                    }
                    drop(done);
                    if stop.load(Ordering::Relaxed) {
                        break;
                    }
                    let mut buffer = Vec::with_capacity(BLOCK_LINES * 256);
                    let mut all = true;
                    for &(number, line) in blocks[block] {
                        all &= write(&mut state, number, line, &mut buffer);
                    }
                    if sender.send((block, buffer, all)).is_err() {
                        break;
                    }
                }
            });
        }
        drop(sender);
        let mut waiting = BTreeMap::new();
        let mut expected = 0;
        let mut all = true;
        let mut result = Ok(());
        for (block, buffer, block_all) in &receiver {
            all &= block_all;
            waiting.insert(block, buffer);
            while let Some(buffer) = waiting.remove(&expected) {
                if let Err(error) = out.write_all(&buffer) {
                    result = Err(error);
                    break;
                }
                expected += 1;
            }
            if result.is_err() {
                break;
            }
            *written.0.lock().unwrap_or_else(|e| e.into_inner()) = expected;
            written.1.notify_all();
        }
        if result.is_err() {
            // Stop the workers: none waits any longer, and their sends fail once the
            // receiver is gone.
            stop_all(&stop, &written);
        }
        drop(receiver);
        result.map(|()| all)
    })
}

/// Sets the stop flag and wakes every waiting worker when the worker holding it unwinds.
struct StopOnPanic<'a> {
    stop: &'a AtomicBool,
    written: &'a (Mutex<usize>, Condvar),
}

impl Drop for StopOnPanic<'_> {
    fn drop(&mut self) {
        if std::thread::panicking() {
            stop_all(self.stop, self.written);
        }
    }
}

/// Sets the stop flag under the lock the workers wait with (so that none checks it, misses
/// the change and then waits for ever) and wakes them all.
fn stop_all(stop: &AtomicBool, written: &(Mutex<usize>, Condvar)) {
    let guard = written.0.lock().unwrap_or_else(|e| e.into_inner());
    stop.store(true, Ordering::Relaxed);
    drop(guard);
    written.1.notify_all();
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Output in input order whatever the number of threads, and the success of every line.
    #[test]
    fn output_is_in_input_order_on_any_number_of_threads() {
        let texts: Vec<String> = (0..5000).map(|i| format!("line {i}")).collect();
        let lines: Vec<(usize, &str)> = texts
            .iter()
            .enumerate()
            .map(|(i, t)| (i + 1, t.as_str()))
            .collect();
        let write = |count: &mut usize, number: usize, line: &str, out: &mut Vec<u8>| {
            *count += 1;
            out.extend_from_slice(format!("{number}:{line}\n").as_bytes());
            number != 4321
        };
        let mut reference = Vec::new();
        let all = write_in_order(&lines, 1, &mut reference, || 0usize, write).unwrap();
        assert!(!all);
        for threads in [2, 3, 8] {
            let mut out = Vec::new();
            let all = write_in_order(&lines, threads, &mut out, || 0usize, write).unwrap();
            assert!(!all);
            assert_eq!(out, reference, "{threads} threads");
        }
    }

    /// A failing output stops the batch with its error, and no worker is left waiting.
    #[test]
    fn an_output_error_stops_the_workers() {
        struct Refuses(usize);
        impl Write for Refuses {
            fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
                if self.0 == 0 {
                    return Err(io::Error::new(io::ErrorKind::BrokenPipe, "gone"));
                }
                self.0 -= 1;
                Ok(buf.len())
            }
            fn flush(&mut self) -> io::Result<()> {
                Ok(())
            }
        }
        let texts: Vec<String> = (0..50_000).map(|i| format!("{i}")).collect();
        let lines: Vec<(usize, &str)> = texts.iter().map(|t| (1, t.as_str())).collect();
        let error = write_in_order(
            &lines,
            2,
            &mut Refuses(3),
            || (),
            |_, _, line, out| {
                out.extend_from_slice(line.as_bytes());
                true
            },
        )
        .unwrap_err();
        assert_eq!(error.kind(), io::ErrorKind::BrokenPipe);
    }
}
