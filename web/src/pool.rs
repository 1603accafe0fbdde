//! The exact check on every core: a pool of Web Workers, each running the check module
//! (`src/worker.rs`, loaded by `/pkg/check-worker.js`).
//!
//! The page sends each worker its own copy of the packed matrix, then hands out jobs one at a
//! time as answers come back: the id and properties first (one long job), then the shares of
//! [`Split`] from the largest down, so the workers finish together. Every answer is merged by
//! [`Merge`], which takes each share once and makes the report only when all n(n−1)/2 pairs
//! are in; the verdict is core's, whichever thread computed it. The main thread only posts
//! messages and merges, so the page keeps answering.
//!
//! A pool belongs to one check at a time: the check takes it and gives it back when done, and
//! a check that is abandoned (a newer input arrived) terminates its workers, so no stale
//! answer can reach a later check. When workers cannot start, [`take`] gives `None` and the
//! page falls back to checking in slices on the main thread.

use crate::app::window;
use futures::channel::mpsc::{unbounded, UnboundedReceiver};
use futures::StreamExt;
use hadamard_core::verify::{Facts, Merge, Report, Share, Split};
use hadamard_core::Matrix;
use js_sys::{Array, BigUint64Array, Object, Reflect};
use std::cell::{Cell, RefCell};
use wasm_bindgen::prelude::*;
use web_sys::{MessageEvent, Worker, WorkerOptions, WorkerType};

/// The worker script the server serves.
const SCRIPT: &str = "/pkg/check-worker.js";
/// How long the workers may take to start before the page checks on its own.
const START_MS: i32 = 15_000;
/// Jobs queued per worker, so that a worker does not wait for the page between jobs even when
/// the page's thread is kept off the CPU for a while (a busy machine).
const IN_FLIGHT: usize = 4;

/// Started workers, with the channel their answers arrive on.
pub struct Pool {
    workers: Vec<Worker>,
    inbox: UnboundedReceiver<(usize, JsValue)>,
    // The handlers must live as long as the workers.
    _handlers: Vec<Closure<dyn FnMut(JsValue)>>,
}

impl Drop for Pool {
    fn drop(&mut self) {
        for w in &self.workers {
            w.terminate();
        }
    }
}

thread_local! {
    static IDLE: RefCell<Option<Pool>> = const { RefCell::new(None) };
    static BROKEN: Cell<bool> = const { Cell::new(false) };
    static STARTING: Cell<bool> = const { Cell::new(false) };
}

/// True when the check of `m` is large enough to be worth the workers: about 3·10⁷ word
/// products and up (order 2048 and above). Order 1024 takes about 10 ms on the page, less than
/// the round trips to the workers cost on a busy machine.
pub fn worth_it(m: &Matrix) -> bool {
    Split::of(m)
        .pairs()
        .saturating_mul(m.words_per_row() as u64)
        >= 30_000_000
}

/// Starts the pool in the background, so that the first large check does not wait for it.
pub fn warm_up() {
    if BROKEN.get() || IDLE.with(|p| p.borrow().is_some()) {
        return;
    }
    leptos::task::spawn_local(async {
        if let Some(p) = take().await {
            give_back(p);
        }
    });
}

/// The idle pool, started if need be; `None` when workers are not available here.
pub async fn take() -> Option<Pool> {
    // A pool being started (by `warm_up`) is the one to wait for, rather than a second.
    while STARTING.get() {
        crate::api::next_tick().await;
    }
    if let Some(p) = IDLE.with(|p| p.borrow_mut().take()) {
        return Some(p);
    }
    if BROKEN.get() {
        return None;
    }
    STARTING.set(true);
    let started = start().await;
    STARTING.set(false);
    match started {
        Ok(p) => Some(p),
        Err(e) => {
            BROKEN.set(true);
            web_sys::console::warn_1(&format!("checking on the page itself: {e}").into());
            None
        }
    }
}

/// Returns a pool after a completed check, for the next one.
pub fn give_back(p: Pool) {
    IDLE.with(|slot| {
        let mut slot = slot.borrow_mut();
        if slot.is_none() {
            *slot = Some(p);
        }
    });
}

fn workers_wanted() -> usize {
    let cores = window().navigator().hardware_concurrency();
    if cores.is_finite() && cores >= 1.0 {
        (cores as usize).min(8)
    } else {
        2
    }
}

async fn start() -> Result<Pool, String> {
    let global = js_sys::global();
    if !Reflect::has(&global, &"Worker".into()).unwrap_or(false) {
        return Err("this browser has no Web Workers".into());
    }
    let (tx, inbox) = unbounded::<(usize, JsValue)>();
    let opts = WorkerOptions::new();
    opts.set_type(WorkerType::Module);
    let count = workers_wanted();
    let mut workers = Vec::with_capacity(count);
    let mut handlers = Vec::with_capacity(2 * count + 1);
    for k in 0..count {
        let w = Worker::new_with_options(SCRIPT, &opts)
            .map_err(|e| format!("a worker could not be made: {e:?}"))?;
        let t = tx.clone();
        let on_message = Closure::<dyn FnMut(JsValue)>::new(move |e: JsValue| {
            let data = e.unchecked_into::<MessageEvent>().data();
            let _ = t.unbounded_send((k, data));
        });
        w.set_onmessage(Some(on_message.as_ref().unchecked_ref()));
        let t = tx.clone();
        let on_error = Closure::<dyn FnMut(JsValue)>::new(move |_e: JsValue| {
            let _ = t.unbounded_send((k, message("error", "the worker failed to run")));
        });
        w.set_onerror(Some(on_error.as_ref().unchecked_ref()));
        workers.push(w);
        handlers.push(on_message);
        handlers.push(on_error);
    }
    let t = tx.clone();
    let timeout = Closure::<dyn FnMut(JsValue)>::new(move |_| {
        let _ = t.unbounded_send((usize::MAX, message("timeout", "")));
    });
    let timer = window()
        .set_timeout_with_callback_and_timeout_and_arguments_0(
            timeout.as_ref().unchecked_ref(),
            START_MS,
        )
        .unwrap_or(0);
    handlers.push(timeout);
    let mut pool = Pool {
        workers,
        inbox,
        _handlers: handlers,
    };
    let mut ready = 0;
    while ready < count {
        let Some((_, data)) = pool.inbox.next().await else {
            return Err("the workers went away".into());
        };
        match kind(&data).as_str() {
            "ready" => ready += 1,
            "timeout" => return Err("the workers did not start in time".into()),
            _ => return Err(text(&data, "message")),
        }
    }
    window().clear_timeout_with_handle(timer);
    Ok(pool)
}

fn message(kind: &str, text: &str) -> JsValue {
    let o = Object::new();
    let _ = Reflect::set(&o, &"kind".into(), &kind.into());
    let _ = Reflect::set(&o, &"message".into(), &text.into());
    o.into()
}

fn kind(data: &JsValue) -> String {
    text(data, "kind")
}

fn text(data: &JsValue, key: &str) -> String {
    Reflect::get(data, &key.into())
        .ok()
        .and_then(|v| v.as_string())
        .unwrap_or_default()
}

/// A job for a worker.
#[derive(Clone, Copy)]
enum Job {
    Facts,
    Share(usize),
}

impl Pool {
    /// How many workers there are.
    pub fn size(&self) -> usize {
        self.workers.len()
    }

    fn post(&self, k: usize, o: &Object, transfer: Option<&Array>) -> Result<(), String> {
        let r = match transfer {
            Some(t) => self.workers[k].post_message_with_transfer(o, t),
            None => self.workers[k].post_message(o),
        };
        r.map_err(|e| format!("a message to a worker failed: {e:?}"))
    }

    fn send(&self, k: usize, job: Job, cap: usize) -> Result<(), String> {
        let o = Object::new();
        match job {
            Job::Facts => {
                let _ = Reflect::set(&o, &"kind".into(), &"facts".into());
            }
            Job::Share(s) => {
                let _ = Reflect::set(&o, &"kind".into(), &"share".into());
                let _ = Reflect::set(&o, &"share".into(), &(s as f64).into());
                let _ = Reflect::set(&o, &"cap".into(), &(cap as f64).into());
            }
        }
        self.post(k, &o, None)
    }

    /// Checks `m` on the workers, calling `progress` with the fraction of pairs merged after
    /// each answer. Gives the report, the milliseconds the workers spent on their jobs in all
    /// (for the benchmark: against the wall time it shows how well the cores were used), and
    /// the pool back; `None` when `still_wanted` turns false (the pool is then dropped, and with
    /// it the workers and their unfinished jobs).
    pub async fn check(
        mut self,
        m: &Matrix,
        cap: usize,
        progress: impl Fn(f64),
        still_wanted: impl Fn() -> bool,
    ) -> Option<Result<(Report, f64, Pool), String>> {
        let mut merge = Merge::new(m, cap);
        // Popped from the end: the facts first, then the shares from the largest down.
        let mut jobs: Vec<Job> = (0..merge.split().shares()).map(Job::Share).collect();
        jobs.push(Job::Facts);
        for k in 0..self.size() {
            let words = BigUint64Array::new_with_length(m.words().len() as u32);
            words.copy_from(m.words());
            let o = Object::new();
            let _ = Reflect::set(&o, &"kind".into(), &"load".into());
            let _ = Reflect::set(&o, &"rows".into(), &(m.rows() as f64).into());
            let _ = Reflect::set(&o, &"cols".into(), &(m.cols() as f64).into());
            let _ = Reflect::set(&o, &"words".into(), &words);
            if let Err(e) = self.post(k, &o, Some(&Array::of1(&words.buffer()))) {
                return Some(Err(e));
            }
        }
        for _ in 0..IN_FLIGHT {
            for k in 0..self.size() {
                if let Some(job) = jobs.pop() {
                    if let Err(e) = self.send(k, job, cap) {
                        return Some(Err(e));
                    }
                }
            }
        }
        let mut facts: Option<Facts> = None;
        let mut busy_ms = 0.0;
        while !(merge.is_complete() && facts.is_some()) {
            let (k, data) = self.inbox.next().await?;
            if !still_wanted() {
                return None;
            }
            let json = text(&data, "json");
            busy_ms += Reflect::get(&data, &"ms".into())
                .ok()
                .and_then(|v| v.as_f64())
                .unwrap_or(0.0);
            let merged = match kind(&data).as_str() {
                "share" => serde_json::from_str::<Share>(&json)
                    .map_err(|e| e.to_string())
                    .and_then(|s| merge.add(s).map_err(|e| e.to_string())),
                "facts" => serde_json::from_str::<Facts>(&json)
                    .map(|f| facts = Some(f))
                    .map(|_| merge.progress())
                    .map_err(|e| e.to_string()),
                _ => Err(text(&data, "message")),
            };
            match merged {
                Ok(f) => progress(f),
                Err(e) => return Some(Err(format!("a worker's answer was refused: {e}"))),
            }
            if let Some(job) = jobs.pop() {
                if let Err(e) = self.send(k, job, cap) {
                    return Some(Err(e));
                }
            }
        }
        let facts = facts?;
        Some(
            merge
                .finish(facts)
                .map(|r| (r, busy_ms, self))
                .map_err(|e| e.to_string()),
        )
    }
}
