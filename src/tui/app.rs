//! The loop: draw, block until the next terminal event (no polling, so an idle
//! workspace uses no CPU), turn it into an action through the keymap, update,
//! and carry out the effects, whose outcomes are actions again. While work runs
//! in the background (a sync), the loop also looks for its outcome a few times a
//! second.

use std::collections::VecDeque;
use std::time::Duration;

use ratatui::crossterm::event::{self, Event};

use super::action::{Action, Effect};
use super::effects::{Launch, Services};
use super::keymap;
use super::state::State;
use super::terminal;
use super::update::update;
use super::view::view;

/// Whether colour may be used: not when NO_COLOR is set to anything non-empty.
pub fn colour_allowed() -> bool {
    std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty())
}

/// Opens the workspace and runs it until the user quits.
pub fn run(launch: &Launch) -> anyhow::Result<()> {
    let mut services = Services::open(launch)?;
    let mut state = State::new(colour_allowed());
    let startup = services.startup(launch)?;
    let mut term = terminal::enter()?;
    let mut queue: VecDeque<Action> = startup.into();
    let outcome = (|| -> anyhow::Result<()> {
        loop {
            let mut show_busy = |state: &State| {
                // Best effort: a frame that cannot be drawn now is drawn after.
                let _ = term.draw(|frame| view(state, frame));
            };
            if drain_showing(&mut state, &mut services, &mut queue, &mut show_busy) {
                return Ok(());
            }
            term.draw(|frame| view(&state, frame))?;
            if services.background_running() && !event::poll(BACKGROUND_LOOK)? {
                queue.extend(services.background_outcome(false));
                continue;
            }
            let event = event::read()?;
            if let Event::Key(key) = event
                && let Some(action) = keymap::action_for(state.context(), key)
            {
                queue.push_back(action);
            }
        }
    })();
    terminal::leave();
    outcome
}

/// How often the loop looks for the outcome of work running in the background.
const BACKGROUND_LOOK: Duration = Duration::from_millis(100);

/// Updates with every queued action and performs the effects, waiting for any
/// work they start in the background and taking in its outcome too (so that a
/// caller without a terminal sees the whole of what a command did); true to quit.
pub fn drain(state: &mut State, services: &mut Services, queue: &mut VecDeque<Action>) -> bool {
    loop {
        if drain_showing(state, services, queue, &mut |_| {}) {
            return true;
        }
        if !services.background_running() {
            return false;
        }
        queue.extend(services.background_outcome(true));
    }
}

/// As [`drain`], first telling the user and calling `show` (to draw a frame)
/// before each slow effect.
pub fn drain_showing(
    state: &mut State,
    services: &mut Services,
    queue: &mut VecDeque<Action>,
    show: &mut dyn FnMut(&State),
) -> bool {
    while let Some(action) = queue.pop_front() {
        for effect in update(state, action) {
            if effect == Effect::Quit {
                return true;
            }
            let busy = effect.busy_words();
            if let Some(words) = busy {
                state.tell(words);
                show(state);
            }
            queue.extend(services.perform(effect));
            if busy.is_some_and(|words| state.message.as_ref().is_some_and(|m| m.text == words)) {
                // Done: what it brought says the rest.
                state.message = None;
            }
        }
    }
    false
}
