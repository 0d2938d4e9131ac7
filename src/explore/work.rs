//! The render queue. Requests come in faster than they can be drawn while a standpoint is
//! dragged, and only the newest matters: each pane of each page has one waiting place, and
//! a newer request takes it, the older one being answered at once as replaced (204). Two
//! renderer threads take the waiting requests in the order their panes first asked, so at
//! most two renders run at a time and the request threads never draw.

use std::collections::{HashMap, VecDeque};
use std::sync::{Condvar, Mutex};
use std::time::Instant;

/// How many panes may wait at once; beyond that a request is refused as busy (503).
pub const MAX_WAITING: usize = 256;

/// The number of renders that may run at once.
pub const RENDERERS: usize = 2;

/// One waiting request: what to do and whom to answer.
pub struct Job<T, R> {
    pub task: T,
    pub reply: R,
    pub received: Instant,
}

/// Waiting jobs by pane key, and the order the keys asked in.
struct Waiting<T, R> {
    order: VecDeque<String>,
    jobs: HashMap<String, Job<T, R>>,
    closed: bool,
}

/// What became of a job given to [`Queue::push`].
pub enum Pushed<T, R> {
    /// Waiting; an older job for the same pane, if there was one, is handed back to be
    /// answered as replaced.
    Waiting(Option<Job<T, R>>),
    /// Too many panes waiting (or the queue closed): the job comes back to be refused.
    Full(Job<T, R>),
}

pub struct Queue<T, R> {
    waiting: Mutex<Waiting<T, R>>,
    ready: Condvar,
}

impl<T, R> Default for Queue<T, R> {
    fn default() -> Self {
        Queue {
            waiting: Mutex::new(Waiting {
                order: VecDeque::new(),
                jobs: HashMap::new(),
                closed: false,
            }),
            ready: Condvar::new(),
        }
    }
}

impl<T, R> Queue<T, R> {
    fn lock(&self) -> std::sync::MutexGuard<'_, Waiting<T, R>> {
        self.waiting.lock().unwrap_or_else(|p| p.into_inner())
    }

    /// Puts `job` in the waiting place of `key`.
    pub fn push(&self, key: String, job: Job<T, R>) -> Pushed<T, R> {
        let mut waiting = self.lock();
        if waiting.closed {
            return Pushed::Full(job);
        }
        if let Some(old) = waiting.jobs.get_mut(&key) {
            let old = std::mem::replace(old, job);
            return Pushed::Waiting(Some(old));
        }
        if waiting.jobs.len() >= MAX_WAITING {
            return Pushed::Full(job);
        }
        waiting.order.push_back(key.clone());
        waiting.jobs.insert(key, job);
        drop(waiting);
        self.ready.notify_one();
        Pushed::Waiting(None)
    }

    /// The next job, waiting for one; `None` once the queue is closed and empty.
    pub fn take(&self) -> Option<Job<T, R>> {
        let mut waiting = self.lock();
        loop {
            if let Some(key) = waiting.order.pop_front() {
                if let Some(job) = waiting.jobs.remove(&key) {
                    return Some(job);
                }
                continue;
            }
            if waiting.closed {
                return None;
            }
            waiting = self.ready.wait(waiting).unwrap_or_else(|p| p.into_inner());
        }
    }

    /// Stops taking jobs; the waiting ones are handed back to be answered.
    pub fn close(&self) -> Vec<Job<T, R>> {
        let mut waiting = self.lock();
        waiting.closed = true;
        waiting.order.clear();
        let left = waiting.jobs.drain().map(|(_, job)| job).collect();
        drop(waiting);
        self.ready.notify_all();
        left
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn job(task: u32) -> Job<u32, ()> {
        Job {
            task,
            reply: (),
            received: Instant::now(),
        }
    }

    #[test]
    fn a_newer_request_replaces_the_waiting_one_of_its_pane() {
        let queue = Queue::default();
        assert!(matches!(
            queue.push("a".into(), job(1)),
            Pushed::Waiting(None)
        ));
        assert!(matches!(
            queue.push("b".into(), job(2)),
            Pushed::Waiting(None)
        ));
        match queue.push("a".into(), job(3)) {
            Pushed::Waiting(Some(old)) => assert_eq!(old.task, 1),
            _ => panic!("the first job of pane a should come back"),
        }
        // Pane a asked first, so its newest job comes first.
        assert_eq!(queue.take().unwrap().task, 3);
        assert_eq!(queue.take().unwrap().task, 2);
        assert!(queue.close().is_empty());
        assert!(queue.take().is_none());
    }

    #[test]
    fn too_many_panes_are_refused() {
        let queue = Queue::default();
        for k in 0..MAX_WAITING {
            assert!(matches!(
                queue.push(k.to_string(), job(0)),
                Pushed::Waiting(None)
            ));
        }
        assert!(matches!(
            queue.push("one more".into(), job(9)),
            Pushed::Full(_)
        ));
        assert_eq!(queue.close().len(), MAX_WAITING);
    }
}
