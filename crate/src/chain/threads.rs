//! Driving a run natively: each task goes to all chains at once, one thread per chain.

use super::conductor::{Collected, Conductor, Progress, RunConfig};
use super::{Chain, Outcome};
use crate::tape::Tape;

/// A whole run: start the chains, drive them to the end, hand back the draws.
pub fn run(tape: &Tape, config: RunConfig, progress: impl FnMut(&Progress)) -> Result<Collected, String> {
    let mut chains = (0..config.chains).map(|i| Chain::new(tape, config.seed, i)).collect::<Result<Vec<_>, _>>()?;
    let mut conductor = Conductor::new(config, tape.dim());
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
    while let Some(task) = conductor.next_task() {
        if stop() {
            return;
        }
        let outcomes: Vec<Outcome> = std::thread::scope(|scope| {
            let running: Vec<_> = chains.iter_mut().map(|chain| scope.spawn(|| chain.perform(tape, &task))).collect();
            running.into_iter().map(|h| h.join().unwrap_or_else(|e| std::panic::resume_unwind(e))).collect()
        });
        conductor.absorb(outcomes);
        progress(&conductor.progress());
    }
}
