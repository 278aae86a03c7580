//! Catchment network: which catchments drain into which, and downstream sums.
//!
//! # Formula
//! For a receiving node `n` with upstream set `U(n)` (all catchments draining to it,
//! directly or through others, and `n` itself):
//! `V_n = Σ_{i∈U(n)} V_i`, `L_n = Σ_{i∈U(n)} L_i`, `C_n = 1000·L_n/V_n`.
//! Mass is conserved: loads and volumes are only summed, never lost.
//!
//! Downstream order by Kahn's (1962) topological sort: catchments with nothing
//! draining into them first; a catchment is ordered once everything upstream of it is.
//! Catchments left unordered lie on a cycle.
//!
//! # Symbols
//! * `n`, `i` — catchment indices `0..N`; `U(n)` — upstream set of `n`, itself included.
//! * `V_i` — runoff volume, m³/yr, ≥ 0; `L_i` — load, kg/yr, ≥ 0; `C_n` — concentration, mg/L.
//!
//! # Assumptions
//! No in-stream losses, abstractions or travel time; annual totals only. Each
//! catchment drains into at most one other, never into itself (a forest of trees).
//!
//! # References
//! Kahn, A. B. (1962). Topological sorting of large networks. *Communications of
//! the ACM*, 5(11), 558–562.

/// A validated drainage network over catchments `0..n`.
#[derive(Debug, Clone)]
pub struct Network {
    downstream: Vec<Option<usize>>,
    /// Catchment indices ordered so every catchment comes before the one it drains into.
    order: Vec<usize>,
}

/// Why a network is invalid.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum NetworkError {
    /// A catchment drains into itself.
    SelfLoop(usize),
    /// The listed catchments form a cycle.
    Cycle(Vec<usize>),
    /// A downstream index is out of range.
    OutOfRange(usize),
}

impl Network {
    /// Builds a network from each catchment's downstream index (`None` = outlet).
    pub fn new(downstream: Vec<Option<usize>>) -> Result<Network, NetworkError> {
        let n = downstream.len();
        let mut indegree = vec![0usize; n];
        for (i, d) in downstream.iter().enumerate() {
            if let Some(j) = *d {
                if j >= n {
                    return Err(NetworkError::OutOfRange(i));
                }
                if j == i {
                    return Err(NetworkError::SelfLoop(i));
                }
                indegree[j] += 1;
            }
        }
        let mut stack: Vec<usize> = (0..n).filter(|&i| indegree[i] == 0).collect();
        let mut order = Vec::with_capacity(n);
        while let Some(i) = stack.pop() {
            order.push(i);
            if let Some(j) = downstream[i] {
                indegree[j] -= 1;
                if indegree[j] == 0 {
                    stack.push(j);
                }
            }
        }
        if order.len() < n {
            let mut in_cycle: Vec<usize> = (0..n).filter(|&i| indegree[i] > 0).collect();
            in_cycle.sort_unstable();
            return Err(NetworkError::Cycle(in_cycle));
        }
        Ok(Network { downstream, order })
    }

    /// Number of catchments.
    pub fn len(&self) -> usize {
        self.downstream.len()
    }

    /// True when there are no catchments.
    pub fn is_empty(&self) -> bool {
        self.downstream.is_empty()
    }

    /// Downstream catchment of `i`, if any.
    pub fn downstream(&self, i: usize) -> Option<usize> {
        self.downstream[i]
    }

    /// Catchments that receive flow from at least one other catchment.
    pub fn receiving_nodes(&self) -> Vec<usize> {
        let mut has_up = vec![false; self.len()];
        for d in self.downstream.iter().flatten() {
            has_up[*d] = true;
        }
        (0..self.len()).filter(|&i| has_up[i]).collect()
    }

    /// Number of catchments upstream of each node, counting the node itself.
    pub fn upstream_counts(&self) -> Vec<usize> {
        self.accumulate(&vec![1.0; self.len()]).into_iter().map(|v| v as usize).collect()
    }

    /// Accumulates a per-catchment quantity downstream: element `i` of the result is
    /// the sum over `i` and every catchment draining to it.
    pub fn accumulate(&self, local: &[f64]) -> Vec<f64> {
        let mut acc = local.to_vec();
        for &i in &self.order {
            if let Some(j) = self.downstream[i] {
                acc[j] += acc[i];
            }
        }
        acc
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn accumulates_in_topological_order() {
        // 0 → 2, 1 → 2, 2 → 3, 3 outlet
        let n = Network::new(vec![Some(2), Some(2), Some(3), None]).unwrap();
        let acc = n.accumulate(&[1.0, 2.0, 4.0, 8.0]);
        assert_eq!(acc, vec![1.0, 2.0, 7.0, 15.0]);
        assert_eq!(n.receiving_nodes(), vec![2, 3]);
        assert_eq!(n.upstream_counts(), vec![1, 1, 3, 4]);
    }

    #[test]
    fn rejects_cycles_and_self_loops() {
        assert_eq!(Network::new(vec![Some(1), Some(0), None]).unwrap_err(), NetworkError::Cycle(vec![0, 1]));
        assert_eq!(Network::new(vec![Some(0)]).unwrap_err(), NetworkError::SelfLoop(0));
    }
}
