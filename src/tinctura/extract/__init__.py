"""From built HTML and CSS to computed styles and text samples (static cascade, no browser)."""
