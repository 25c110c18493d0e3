//! Turn rules: no U-turns for trucks, turn penalties by angle, banned turns.
//!
//! - [`TurnRules`]: the scenario's settings (driving side, where U-turns are
//!   allowed, the penalty of each [`TurnKind`], whether the network's turn
//!   restrictions are obeyed);
//! - [`turn_kind`]: left, right, straight or U-turn from the street geometry;
//! - [`TurnTable`]: the allowed turns after each driving arc and their
//!   penalties, with the typed [`TurnError`]s of rules that cannot be used;
//! - [`TurnDistances`]: turn-aware deadhead costs between served streets
//!   (the street-to-street graph);
//! - [`unservable`]: streets to serve that the rules cut off from the yard;
//! - [`walk_with_turns`]: the explicit walk of a route, every street driven
//!   with the [`Turn`] made before it ([`TurnWalk`]), for plan files, the
//!   checker and the drivers' sheets.
//!
//! **U-turns.** A U-turn is leaving a junction along the street one arrived
//! on. By default ([`UTurns::DeadEndsOnly`]) trucks make them only at a dead
//! end (a junction with one street), where there is no other way; they pay
//! the `u_turn` penalty there (common practice for refuse and winter service
//! vehicles; no source). **Without coordinates** (the public research sets)
//! only U-turns can be recognised; every other turn is
//! [`TurnKind::Unknown`] and costs nothing.
//!
//! **Restrictions.** `no_*` bans the turn from `from` into `to` at `via`;
//! `only_*` bans every other turn out of `from` at `via` (OpenStreetMap
//! tagging). The yard is free: a route starts there in any direction and
//! may end there arriving along any street.

mod angle;
mod paths;
mod plan;
mod reach;
mod rules;
mod table;
mod walk;

pub use angle::turn_kind;
pub use paths::{driving_arc, search, source_of, Search, Source, TurnDistances, FULL_MATRIX_TASKS};
pub use plan::{plan_from_visits, totals_with_turns};
pub use reach::unservable;
pub use rules::{DrivingSide, TurnKind, TurnPenalties, TurnRules, UTurns};
pub use table::{arc_of, head, tail, TurnError, TurnTable, TurnsFrom};
pub use walk::{route_with_turns, walk_with_turns, walks_with_turns, Turn, TurnWalk};
