//! Driving a run natively: one thread per chain for the whole run, each taking its tasks from a
//! channel, so a task costs a message rather than a thread start.

use super::conductor::{Collected, Conductor, Progress};
use super::{Chain, Outcome, Task};
use crate::plan::{RunConfig, Shape};
use crate::tape::Tape;
use std::sync::{Arc, mpsc};
use std::time::{Duration, Instant};

/// Natively, tasks are sized to take about this long: long enough that handing them to threads
/// costs nothing, short enough for a lively progress bar.
const TASK_TIME: Duration = Duration::from_millis(50);

/// A whole run: start the chains, drive them to the end, hand back the draws.
pub fn run(tape: &Tape, config: RunConfig, progress: impl FnMut(&Progress)) -> Result<Collected, String> {
    let mut chains = (0..config.chains).map(|i| Chain::new(tape, config.seed, i)).collect::<Result<Vec<_>, _>>()?;
    let mut conductor = Conductor::new(config, Shape::of(tape));
    drive(tape, &mut conductor, &mut chains, progress, || false);
    Ok(conductor.finish())
}

/// Run `conductor` to the end over `chains`, calling `progress` after every task. `stop` is
/// polled between tasks; when it returns true the run ends early with the draws made so far.
pub fn drive(
    tape: &Tape,
    conductor: &mut Conductor,
    chains: &mut [Chain],
    mut progress: impl FnMut(&Progress),
    stop: impl Fn() -> bool,
) {
    std::thread::scope(|scope| {
        let (answers, outcomes) = mpsc::channel::<Outcome>();
        let tasks: Vec<mpsc::Sender<Arc<Task>>> = chains
            .iter_mut()
            .map(|chain| {
                let (send, receive) = mpsc::channel::<Arc<Task>>();
                let answers = answers.clone();
                scope.spawn(move || {
                    for task in receive {
                        if answers.send(chain.perform(tape, &task)).is_err() {
                            break;
                        }
                    }
                });
                send
            })
            .collect();
        while let Some(task) = conductor.next_task() {
            if stop() {
                break;
            }
            let steps = match &task {
                Task::Run { steps, .. } | Task::Adapt { steps, .. } => *steps,
                _ => 0,
            };
            let started = Instant::now();
            let task = Arc::new(task);
            for send in &tasks {
                // A chain's thread only stops after a panic, which `scope` passes on.
                let _ = send.send(Arc::clone(&task));
            }
            let collected: Vec<Outcome> = (0..tasks.len()).map_while(|_| outcomes.recv().ok()).collect();
            if collected.len() < tasks.len() {
                break; // a chain's thread died; `scope` reports its panic
            }
            conductor.absorb(collected);
            progress(&conductor.progress());
            if steps > 0 {
                let per_step = started.elapsed().as_secs_f64() / steps as f64;
                conductor.set_chunk((TASK_TIME.as_secs_f64() / per_step.max(1e-9)).clamp(50.0, 1e6) as usize);
            }
        }
        drop(tasks);
    });
}
