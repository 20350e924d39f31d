//! Independent items on every core, with results that do not depend on how many there are.
//!
//! A site's worksheets and checks are independent of each other, so they run on several
//! threads. The caller sees the results as one thread would produce them: each is handed
//! over with its index, and a failure is the one of the first failing item in item order.

use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::mpsc;

/// The variable that sets the number of threads (a whole number from 1); unset, one per
/// core.
pub const THREADS_VAR: &str = "PVHAZARD_THREADS";

/// The number of threads a batch uses: [`THREADS_VAR`] if it holds a whole number from 1,
/// else the cores available.
pub fn threads() -> usize {
    std::env::var(THREADS_VAR)
        .ok()
        .and_then(|v| v.trim().parse::<usize>().ok())
        .filter(|n| *n >= 1)
        .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, usize::from))
}

/// Runs `work` on every item on up to `threads` threads and hands each `Ok` result to
/// `take` on the calling thread, with the item's index, as it arrives (not in item order).
///
/// The first failure in item order is returned, whatever the order the threads finish in:
/// after a failure at index `i`, no item after `i` is started, and items before it still
/// run, since one of them may fail too. `take` may fail as well; its failure counts at the
/// index it was given.
pub fn run<T, R, E>(
    items: &[T],
    threads: usize,
    work: impl Fn(usize, &T) -> Result<R, E> + Sync,
    mut take: impl FnMut(usize, R) -> Result<(), E>,
) -> Result<(), E>
where
    T: Sync,
    R: Send,
    E: Send,
{
    let next = AtomicUsize::new(0);
    // The index of the first failure so far; items after it are not started.
    let first_failure = AtomicUsize::new(usize::MAX);
    let mut failure: Option<(usize, E)> = None;
    let fail = |i: usize, e: E, failure: &mut Option<(usize, E)>| {
        first_failure.fetch_min(i, Ordering::SeqCst);
        if failure.as_ref().is_none_or(|(j, _)| i < *j) {
            *failure = Some((i, e));
        }
    };
    std::thread::scope(|scope| {
        // A bounded channel: a caller slower than the workers holds them back instead of
        // letting finished results pile up.
        let workers = threads.clamp(1, items.len().max(1));
        let (tx, rx) = mpsc::sync_channel::<(usize, Result<R, E>)>(workers);
        for _ in 0..workers {
            let tx = tx.clone();
            let (next, first_failure, work) = (&next, &first_failure, &work);
            scope.spawn(move || loop {
                let i = next.fetch_add(1, Ordering::SeqCst);
                if i >= items.len() || i > first_failure.load(Ordering::SeqCst) {
                    break;
                }
                if tx.send((i, work(i, &items[i]))).is_err() {
                    break;
                }
            });
        }
        drop(tx);
        for (i, result) in rx {
            match result {
                Ok(r) if i < first_failure.load(Ordering::SeqCst) => {
                    if let Err(e) = take(i, r) {
                        fail(i, e, &mut failure);
                    }
                }
                // A result after a failure is not wanted.
                Ok(_) => {}
                Err(e) => fail(i, e, &mut failure),
            }
        }
    });
    match failure {
        Some((_, e)) => Err(e),
        None => Ok(()),
    }
}

/// As [`run`], with the results in item order; `arrived(i)` is called on the calling thread
/// as item `i`'s result arrives (for a progress count).
pub fn collect<T, R, E>(
    items: &[T],
    threads: usize,
    work: impl Fn(usize, &T) -> Result<R, E> + Sync,
    mut arrived: impl FnMut(usize),
) -> Result<Vec<R>, E>
where
    T: Sync,
    R: Send,
    E: Send,
{
    let mut slots: Vec<Option<R>> = (0..items.len()).map(|_| None).collect();
    run(items, threads, work, |i, r| {
        arrived(i);
        slots[i] = Some(r);
        Ok(())
    })?;
    Ok(slots.into_iter().flatten().collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_item_is_taken_once_with_its_index() {
        for threads in [1, 2, 3, 8] {
            let items: Vec<u64> = (0..100).collect();
            let mut seen = vec![0; 100];
            run(
                &items,
                threads,
                |i, x| Ok::<_, ()>((i, x * x)),
                |i, (j, sq)| {
                    assert_eq!(i, j);
                    assert_eq!(sq, (i * i) as u64);
                    seen[i] += 1;
                    Ok(())
                },
            )
            .unwrap();
            assert!(seen.iter().all(|n| *n == 1), "{threads} threads: {seen:?}");
        }
    }

    #[test]
    fn the_failure_is_the_first_in_item_order_whatever_finishes_first() {
        let items: Vec<usize> = (0..50).collect();
        for threads in [1, 2, 4] {
            let r = run(
                &items,
                threads,
                |i, _| {
                    // Later failures finish sooner.
                    if i == 30 || i == 12 {
                        std::thread::sleep(std::time::Duration::from_millis(60 - i as u64));
                        Err(i)
                    } else if i == 40 {
                        Err(i)
                    } else {
                        Ok(i)
                    }
                },
                |_, _| Ok(()),
            );
            assert_eq!(r, Err(12), "{threads} threads");
            // A failure while taking a result counts at its index.
            let r = run(
                &items,
                threads,
                |i, _| if i == 20 { Err(i) } else { Ok(i) },
                |i, _| if i == 7 { Err(100 + i) } else { Ok(()) },
            );
            assert_eq!(r, Err(107), "{threads} threads");
        }
    }

    #[test]
    fn collected_results_are_in_item_order_whatever_finishes_first() {
        let items: Vec<u64> = (0..40).collect();
        for threads in [1, 3] {
            let mut arrived = 0;
            let out = collect(
                &items,
                threads,
                |i, x| {
                    // Early items finish last.
                    std::thread::sleep(std::time::Duration::from_micros(400 - 10 * i as u64));
                    Ok::<_, ()>(x * 2)
                },
                |_| arrived += 1,
            )
            .unwrap();
            assert_eq!(out, items.iter().map(|x| x * 2).collect::<Vec<_>>());
            assert_eq!(arrived, items.len());
        }
    }

    #[test]
    fn no_items_and_more_threads_than_items_are_fine() {
        let none: [u8; 0] = [];
        run(&none, 4, |_, _| Ok::<_, ()>(()), |_, _| Ok(())).unwrap();
        let mut n = 0;
        run(
            &[1, 2],
            16,
            |_, x| Ok::<_, ()>(*x),
            |_, x| {
                n += x;
                Ok(())
            },
        )
        .unwrap();
        assert_eq!(n, 3);
    }
}
