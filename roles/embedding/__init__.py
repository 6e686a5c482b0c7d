"""From the network to groups of members: graph -> CSR arrays (graph), biased walks
(walks/), skip-gram vectors for the two views (embed), the training budget (budget),
and HDBSCAN groups read with the network's ties (cluster, refine)."""
