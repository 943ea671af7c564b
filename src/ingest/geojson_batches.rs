//! The features array read in batches on two threads: while another thread parses one batch,
//! this one hands the batch before it to the caller's callback and cuts the batch after it, so
//! reading a large layer keeps both cores busy. Features reach the callback one by one in file
//! order, and the failure reported is the first in file order, as when reading one by one: a
//! broken text found while cutting ahead waits until every feature before it has been delivered.
//! With one thread (`RAYON_NUM_THREADS=1`, or inside a one-thread pool) the same steps run in
//! turn on the calling thread.

use super::{FeatureSeed, RawFeature, ReadFailure, TRAILING_COMMA, at, io_fail, syntax};
use crate::ingest::scan::{Position, Scanner};
use serde::de::DeserializeSeed;
use std::io::Read;
use std::thread::{Scope, ScopedJoinHandle};

/// A batch is cut after this many features or this many bytes of text, whichever comes first:
/// large enough that starting a thread per batch costs nothing measurable, small enough that the
/// raw text held at once stays near a megabyte per batch.
const FEATURES: usize = 2048;
const BYTES: usize = 1 << 20;

/// The text of consecutive features, cut but not yet parsed.
#[derive(Default)]
struct Batch {
    /// Index of the batch's first feature in the collection.
    first: usize,
    /// The features' bytes, one after another.
    text: Vec<u8>,
    /// Per feature: where its text ends in `text`, and where it starts in the file.
    ends: Vec<(usize, Position)>,
}

/// How cutting a batch stopped.
enum Stop<E> {
    /// The batch is full and more of the array follows.
    Full,
    /// The features array ended (its `]` consumed).
    End,
    /// The text is broken after the batch's features; reported once they are delivered.
    Failed(ReadFailure<E>),
}

/// Each feature parsed, up to and including the first that fails.
type Parsed = Vec<Result<RawFeature, serde_json::Error>>;

/// A batch being parsed, on another thread or already done.
enum Parsing<'s> {
    Done(Batch, Parsed),
    Running(ScopedJoinHandle<'s, (Batch, Parsed)>),
}

/// Reads the features of an array whose `[` has been consumed, calling `sink(index, feature)`
/// for each, indices from `first`; returns the index after the last feature.
pub(super) fn read_features<R, E, F>(
    sc: &mut Scanner<R>,
    wanted: &[String],
    sink: &mut F,
    first: usize,
) -> Result<usize, ReadFailure<E>>
where
    R: Read,
    F: FnMut(usize, RawFeature) -> Result<(), E>,
{
    let two = rayon::current_num_threads() > 1;
    std::thread::scope(|s| {
        let mut cur = Batch::default();
        let mut stop = cut(sc, &mut cur, first);
        let mut waiting: Option<(Batch, Parsed, Stop<E>)> = None;
        loop {
            let next_first = cur.first + cur.ends.len();
            let full = matches!(stop, Stop::Full);
            let parsing = start(s, two, cur, wanted);
            // Meanwhile: deliver the batch before, then cut the one after (in its buffers).
            let mut spare = Batch::default();
            if let Some((b, parsed, st)) = waiting.take() {
                deliver(&b, parsed, st, sink)?;
                spare = b;
            }
            let next = full.then(|| cut(sc, &mut spare, next_first));
            let (b, parsed) = finish(parsing);
            match next {
                Some(n) => {
                    waiting = Some((b, parsed, std::mem::replace(&mut stop, n)));
                    cur = spare;
                }
                None => {
                    deliver(&b, parsed, stop, sink)?;
                    return Ok(next_first);
                }
            }
        }
    })
}

/// Starts parsing a batch: on another thread when there are two, else right here.
fn start<'s>(s: &'s Scope<'s, '_>, two: bool, b: Batch, wanted: &'s [String]) -> Parsing<'s> {
    if two && !b.ends.is_empty() {
        Parsing::Running(s.spawn(move || {
            let parsed = parse(&b, wanted);
            (b, parsed)
        }))
    } else {
        let parsed = parse(&b, wanted);
        Parsing::Done(b, parsed)
    }
}

/// Waits for a batch's parse (a panic on the parsing thread goes on here).
fn finish(p: Parsing) -> (Batch, Parsed) {
    match p {
        Parsing::Done(b, parsed) => (b, parsed),
        Parsing::Running(h) => h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)),
    }
}

/// Cuts up to a batch of features into `b` (emptied first), the first with index `first`.
fn cut<R: Read, E>(sc: &mut Scanner<R>, b: &mut Batch, first: usize) -> Stop<E> {
    b.first = first;
    b.text.clear();
    b.ends.clear();
    let eof = |sc: &Scanner<R>, what: &str, feature: usize| {
        Stop::Failed(ReadFailure::Syntax {
            message: at(what, sc.position()),
            feature: Some(feature),
        })
    };
    loop {
        if b.ends.len() >= FEATURES || b.text.len() >= BYTES {
            return Stop::Full;
        }
        let index = first + b.ends.len();
        match sc.peek() {
            Err(e) => return Stop::Failed(io_fail(e, None)),
            Ok(Some(b']')) => {
                sc.bump();
                return Stop::End;
            }
            Ok(Some(_)) => {}
            Ok(None) => return eof(sc, "unexpected end of file", index),
        }
        match sc.value() {
            Err(e) => return Stop::Failed(io_fail(e, Some(index))),
            Ok(None) => return eof(sc, "unexpected end of file inside the feature", index),
            Ok(Some((text, pos))) => {
                b.text.extend_from_slice(text);
                b.ends.push((b.text.len(), pos));
            }
        }
        match sc.peek() {
            Err(e) => return Stop::Failed(io_fail(e, None)),
            Ok(Some(b',')) => {
                sc.bump();
                if let Ok(Some(b']')) = sc.peek() {
                    return Stop::Failed(ReadFailure::Syntax {
                        message: at(TRAILING_COMMA, sc.position()),
                        feature: None,
                    });
                }
            }
            Ok(Some(b']')) => {}
            Ok(Some(_)) => return eof(sc, "expected ',' or ']' after a feature", index + 1),
            Ok(None) => return eof(sc, "unexpected end of file", index + 1),
        }
    }
}

/// Parses a batch's features in order, stopping at the first that fails (none after it is
/// ever delivered).
fn parse(b: &Batch, wanted: &[String]) -> Parsed {
    let mut out = Vec::with_capacity(b.ends.len());
    let mut start = 0;
    for (k, &(end, _)) in b.ends.iter().enumerate() {
        let mut de = serde_json::Deserializer::from_slice(&b.text[start..end]);
        start = end;
        let f = FeatureSeed {
            wanted,
            collect_keys: b.first + k == 0,
        }
        .deserialize(&mut de)
        .and_then(|f| de.end().map(|_| f));
        let failed = f.is_err();
        out.push(f);
        if failed {
            break;
        }
    }
    out
}

/// Hands a parsed batch to the callback in order; then reports how its cutting stopped (`true`
/// when the array ended).
fn deliver<E, F>(
    b: &Batch,
    parsed: Parsed,
    stop: Stop<E>,
    sink: &mut F,
) -> Result<bool, ReadFailure<E>>
where
    F: FnMut(usize, RawFeature) -> Result<(), E>,
{
    for (k, f) in parsed.into_iter().enumerate() {
        let index = b.first + k;
        let f = f.map_err(|e| syntax(&e, b.ends[k].1, Some(index)))?;
        sink(index, f).map_err(ReadFailure::Callback)?;
    }
    match stop {
        Stop::Full => Ok(false),
        Stop::End => Ok(true),
        Stop::Failed(e) => Err(e),
    }
}

#[cfg(test)]
mod tests {
    use super::super::read_collection;
    use super::*;

    /// A collection of `n` one-line features whose coordinates carry their index; `broken`
    /// replaces the text of the features named.
    fn collection(n: usize, broken: &[(usize, String)]) -> String {
        let mut s = String::from(r#"{"type":"FeatureCollection","features":["#);
        for i in 0..n {
            if i > 0 {
                s.push_str(",\n");
            }
            match broken.iter().find(|(k, _)| *k == i) {
                Some((_, text)) => s.push_str(text),
                None => s.push_str(&feature(i)),
            }
        }
        s.push_str("]}");
        s
    }

    fn feature(i: usize) -> String {
        format!(
            r#"{{"type":"Feature","properties":{{"k":{i}}},"geometry":{{"type":"LineString","coordinates":[[{i},0],[{i},1]]}}}}"#
        )
    }

    /// Reads with `threads` threads; the indices seen and the outcome.
    fn read(text: &str, threads: usize, stop_at: Option<usize>) -> (Vec<usize>, String) {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| {
            let mut seen = Vec::new();
            let wanted = vec!["k".to_string()];
            let r = read_collection(text.as_bytes(), &wanted, |i, f| {
                assert_eq!(
                    f.coords.pos[0][0], i as f64,
                    "feature {i} carries its own text"
                );
                assert_eq!(f.prop("k"), Some(&serde_json::Value::from(i)));
                assert_eq!(f.keys.is_empty(), i != 0, "only the first collects keys");
                seen.push(i);
                if Some(i) == stop_at {
                    Err("stop")
                } else {
                    Ok(())
                }
            });
            let outcome = match r {
                Ok(info) => format!("ok {}", info.features),
                Err(ReadFailure::Syntax { message, feature }) => format!("{feature:?}: {message}"),
                Err(ReadFailure::Callback(m)) => format!("callback {m}"),
                Err(e) => format!("{e:?}"),
            };
            (seen, outcome)
        })
    }

    #[test]
    fn features_arrive_in_order_across_batches_with_one_or_two_threads() {
        let n = 3 * FEATURES + 17;
        let text = collection(n, &[]);
        for threads in [1, 2] {
            let (seen, outcome) = read(&text, threads, None);
            assert_eq!(seen, (0..n).collect::<Vec<_>>(), "{threads} threads");
            assert_eq!(outcome, format!("ok {n}"));
        }
        let (seen, outcome) = read(&collection(0, &[]), 2, None);
        assert!(seen.is_empty());
        assert_eq!(outcome, "ok 0");
    }

    #[test]
    fn the_first_failure_in_file_order_is_reported() {
        // A feature that does not parse, in the second batch, and a broken separator far after
        // it, cut while the earlier batch is parsed: the earlier failure is the one reported.
        let bad = FEATURES + 5;
        let late = 3 * FEATURES;
        let text = collection(
            4 * FEATURES,
            &[
                (
                    bad,
                    r#"{"type":"Feature","geometry":{"type":"LineString","coordinates":[[1,]]}}"#
                        .to_string(),
                ),
                (late, feature(late) + " x"),
            ],
        );
        let one = read(&text, 1, None);
        assert_eq!(one, read(&text, 2, None));
        assert_eq!(one.0, (0..bad).collect::<Vec<_>>());
        assert!(one.1.starts_with(&format!("Some({bad}): ")), "{}", one.1);
        assert!(one.1.contains(&format!("line {} ", bad + 1)), "{}", one.1);
        // Without the earlier failure the broken separator is reported, after its feature.
        let text = collection(4 * FEATURES, &[(late, feature(late) + " x")]);
        let (seen, outcome) = read(&text, 2, None);
        assert_eq!(seen, (0..=late).collect::<Vec<_>>(), "up to the broken one");
        assert!(
            outcome.starts_with(&format!("Some({}): expected ',' or ']'", late + 1)),
            "{outcome}"
        );
        // A callback refusing a feature stops the reading there.
        let text = collection(3 * FEATURES, &[]);
        for threads in [1, 2] {
            let (seen, outcome) = read(&text, threads, Some(FEATURES + 1));
            assert_eq!(seen, (0..=FEATURES + 1).collect::<Vec<_>>());
            assert_eq!(outcome, "callback stop");
        }
    }
}
