//! Describing a network node by node.

use std::collections::HashMap;

use crate::error::NetworkError;
use crate::kron;
use crate::network::{Hold, InputInfo, Network};

/// Index of a node in a [`NetworkBuilder`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct NodeId(pub usize);

/// Index of an input (boundary temperature or heat input) in a [`NetworkBuilder`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct InputId(pub usize);

#[derive(Clone, Debug)]
pub(crate) struct NodeSpec {
    pub name: String,
    pub capacitance: f64,
}

#[derive(Clone, Debug)]
pub(crate) struct LinkSpec {
    pub a: usize,
    pub b: usize,
    pub conductance: f64,
}

#[derive(Clone, Debug)]
pub(crate) struct BoundarySpec {
    pub node: usize,
    pub input: usize,
    pub conductance: f64,
    pub group: String,
}

#[derive(Clone, Debug)]
pub(crate) struct InjectionSpec {
    pub node: usize,
    pub input: usize,
    pub coefficient: f64,
}

/// Collects nodes, links, boundaries and heat inputs; [`NetworkBuilder::build`] turns them into
/// a [`Network`].
#[derive(Clone, Debug, Default)]
pub struct NetworkBuilder {
    pub(crate) nodes: Vec<NodeSpec>,
    pub(crate) links: Vec<LinkSpec>,
    pub(crate) boundaries: Vec<BoundarySpec>,
    pub(crate) injections: Vec<InjectionSpec>,
    pub(crate) inputs: Vec<InputInfo>,
    names: HashMap<String, usize>,
}

impl NetworkBuilder {
    /// An empty network.
    pub fn new() -> Self {
        Self::default()
    }

    /// Adds a node with capacitance `capacitance_j_k` (J/K); zero makes it massless (it is
    /// eliminated by Kron reduction). Names should be unique; a repeated name gets a suffix.
    pub fn add_node(&mut self, name: &str, capacitance_j_k: f64) -> NodeId {
        let mut unique = name.to_string();
        let mut k = 2;
        while self.names.contains_key(&unique) {
            unique = format!("{name}~{k}");
            k += 1;
        }
        let id = self.nodes.len();
        self.names.insert(unique.clone(), id);
        self.nodes.push(NodeSpec {
            name: unique,
            capacitance: capacitance_j_k,
        });
        NodeId(id)
    }

    /// Adds capacitance (J/K) to an existing node (for example furnishing to a zone's air).
    pub fn add_capacitance(&mut self, node: NodeId, capacitance_j_k: f64) {
        self.nodes[node.0].capacitance += capacitance_j_k;
    }

    /// Looks a node up by name.
    pub fn node(&self, name: &str) -> Option<NodeId> {
        self.names.get(name).copied().map(NodeId)
    }

    /// Name of a node.
    pub fn node_name(&self, node: NodeId) -> &str {
        &self.nodes[node.0].name
    }

    /// Number of nodes added so far.
    pub fn node_count(&self) -> usize {
        self.nodes.len()
    }

    /// Adds an input: a boundary temperature (°C, [`Hold::Linear`]) or a heat input
    /// ([`Hold::Step`]). Returns the existing input if the name is already known.
    pub fn add_input(&mut self, name: &str, hold: Hold) -> InputId {
        if let Some(i) = self.inputs.iter().position(|x| x.name == name) {
            return InputId(i);
        }
        self.inputs.push(InputInfo {
            name: name.to_string(),
            hold,
        });
        InputId(self.inputs.len() - 1)
    }

    /// Looks an input up by name.
    pub fn input(&self, name: &str) -> Option<InputId> {
        self.inputs.iter().position(|x| x.name == name).map(InputId)
    }

    /// Joins two nodes with a conductance (W/K). Parallel links add up.
    pub fn link(&mut self, a: NodeId, b: NodeId, conductance_w_k: f64) {
        self.links.push(LinkSpec {
            a: a.0,
            b: b.0,
            conductance: conductance_w_k,
        });
    }

    /// Joins a node to a boundary temperature input with a conductance (W/K). The heat flow
    /// through this link is reported under `group` (for example "walls", "ventilation").
    pub fn link_boundary(
        &mut self,
        node: NodeId,
        input: InputId,
        conductance_w_k: f64,
        group: &str,
    ) {
        self.boundaries.push(BoundarySpec {
            node: node.0,
            input: input.0,
            conductance: conductance_w_k,
            group: group.to_string(),
        });
    }

    /// Lets `coefficient` times input `input` flow into `node` as heat (W per input unit; 1 for a
    /// heat input in W, an area in m² for an irradiance in W/m²).
    pub fn inject(&mut self, node: NodeId, input: InputId, coefficient: f64) {
        self.injections.push(InjectionSpec {
            node: node.0,
            input: input.0,
            coefficient,
        });
    }

    /// Checks the network and reduces it to a state space.
    ///
    /// Errors: a negative or non-finite value, a self-link, nodes with no path to any boundary,
    /// or no node with a capacitance.
    pub fn build(&self) -> Result<Network, NetworkError> {
        self.validate()?;
        kron::reduce(self)
    }

    fn validate(&self) -> Result<(), NetworkError> {
        for n in &self.nodes {
            if !(n.capacitance.is_finite() && n.capacitance >= 0.0) {
                return Err(NetworkError::BadValue {
                    what: "capacitance",
                    name: n.name.clone(),
                    value: n.capacitance,
                });
            }
        }
        for l in &self.links {
            if l.a == l.b {
                return Err(NetworkError::SelfLink(self.nodes[l.a].name.clone()));
            }
            if !(l.conductance.is_finite() && l.conductance >= 0.0) {
                let name = format!("{} – {}", self.nodes[l.a].name, self.nodes[l.b].name);
                return Err(NetworkError::BadValue {
                    what: "conductance",
                    name,
                    value: l.conductance,
                });
            }
        }
        for b in &self.boundaries {
            if !(b.conductance.is_finite() && b.conductance >= 0.0) {
                let name = format!(
                    "{} – {}",
                    self.nodes[b.node].name, self.inputs[b.input].name
                );
                return Err(NetworkError::BadValue {
                    what: "conductance",
                    name,
                    value: b.conductance,
                });
            }
        }
        for j in &self.injections {
            if !j.coefficient.is_finite() {
                let name = format!(
                    "{} into {}",
                    self.inputs[j.input].name, self.nodes[j.node].name
                );
                return Err(NetworkError::BadValue {
                    what: "injection coefficient",
                    name,
                    value: j.coefficient,
                });
            }
        }
        if !self.nodes.iter().any(|n| n.capacitance > 0.0) {
            return Err(NetworkError::Empty);
        }
        // Every node must reach a boundary through links with a positive conductance.
        let n = self.nodes.len();
        let mut adj: Vec<Vec<usize>> = vec![Vec::new(); n];
        for l in self.links.iter().filter(|l| l.conductance > 0.0) {
            adj[l.a].push(l.b);
            adj[l.b].push(l.a);
        }
        let mut seen = vec![false; n];
        let mut stack: Vec<usize> = self
            .boundaries
            .iter()
            .filter(|b| b.conductance > 0.0)
            .map(|b| b.node)
            .collect();
        for &s in &stack {
            seen[s] = true;
        }
        while let Some(i) = stack.pop() {
            for &j in &adj[i] {
                if !seen[j] {
                    seen[j] = true;
                    stack.push(j);
                }
            }
        }
        let isolated: Vec<String> = (0..n)
            .filter(|&i| !seen[i])
            .map(|i| self.nodes[i].name.clone())
            .collect();
        if !isolated.is_empty() {
            return Err(NetworkError::Isolated { nodes: isolated });
        }
        Ok(())
    }
}
