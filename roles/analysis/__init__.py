"""What the groups and the ties say: role measures (measures), modularity and the Louvain
check (modularity), randomisations (swaps), the two views' agreement (compare),
confidence (confidence), formal groups (formal), findings (findings), removal scenarios
(whatif, customers) and two snapshots (snapshots)."""
