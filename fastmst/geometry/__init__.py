"""Trees over coordinates: point spanning trees, great-circle lengths, Steiner trees along networks."""
