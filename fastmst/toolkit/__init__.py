"""Tools that work on a spanning forest: certificates, margins, bottlenecks, clusters, updates."""
