//! Errors found while assembling a network.

/// A network that cannot be turned into a state space.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum NetworkError {
    /// A capacitance or conductance that is negative, NaN or infinite.
    #[error("{what} of `{name}` is {value}; it must be a finite number ≥ 0")]
    BadValue {
        /// What the value is (for example "capacitance").
        what: &'static str,
        /// The node or link name.
        name: String,
        /// The offending value.
        value: f64,
    },
    /// Nodes with no path through conductances to any boundary: their temperature is not
    /// determined by the weather, so the model is almost certainly missing an element.
    #[error("no path to any boundary (outdoor air, ground or a fixed temperature) from: {}; connect them with an element, an airflow or a link", .nodes.join(", "))]
    Isolated {
        /// Names of the isolated nodes.
        nodes: Vec<String>,
    },
    /// The network has no node with a capacitance.
    #[error("the network has no node with a heat capacity, so there is nothing to simulate")]
    Empty,
    /// A link joins a node to itself.
    #[error("link joins node `{0}` to itself")]
    SelfLink(String),
}
