//! Closed-loop attitude simulation: rigid body, valves, tank in time, controllers
//! firing the same tables the firmware gets, cases from the layout, Monte Carlo.

pub mod body;
pub mod feed;
pub mod tank;
