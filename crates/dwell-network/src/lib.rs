//! The thermal RC network of a building: nodes, conductances, capacitances, boundaries and heat
//! inputs, reduced to a state space the solver can integrate.
//!
//! This crate knows nothing about walls, rooms or files. A model compiler (see `dwell-model`)
//! describes the network with a [`NetworkBuilder`]: nodes with a capacitance (J/K, zero for a
//! massless node such as a surface or a pane), links with a conductance (W/K), boundary links to
//! a temperature input (°C), and injections of heat inputs (W, or any unit whose column holds
//! the matching area). [`NetworkBuilder::build`] checks the graph, removes massless nodes exactly
//! by Kron reduction (the Schur complement of the conductance matrix) and returns a [`Network`]:
//!
//! ```text
//! C ẋ = −K x + U u
//! ```
//!
//! together with *readouts*: linear maps from `(x, u)` to any original node temperature (kept or
//! eliminated) and to the heat flow through every group of boundary links, so an energy ledger
//! can say where the heat went.
//!
//! ```
//! use dwell_network::{NetworkBuilder, Hold};
//! let mut b = NetworkBuilder::new();
//! let outdoor = b.add_input("outdoor_air_c", Hold::Linear);
//! let air = b.add_node("room.air", 2.0e5);
//! let pane = b.add_node("window.pane", 0.0); // massless: eliminated exactly
//! b.link(air, pane, 40.0);
//! b.link_boundary(pane, outdoor, 40.0, "windows");
//! let net = b.build().unwrap();
//! assert_eq!(net.states.len(), 1);
//! // two 40 W/K conductances in series: 20 W/K to outdoors
//! assert!((net.system.conductance[(0, 0)] - 20.0).abs() < 1e-12);
//! ```
#![deny(missing_docs)]

mod builder;
mod error;
mod kron;
mod network;

pub use builder::{InputId, NetworkBuilder, NodeId};
pub use dwell_solver::{InputKind, RcSystem};
pub use error::NetworkError;
pub use network::{Hold, InputInfo, LinearMap, Network, NodeMap};

#[cfg(test)]
mod tests;
