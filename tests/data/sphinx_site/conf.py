project = "Harbour lamp manual"
html_theme = "furo"
html_static_path = ["_static"]
html_css_files = ["lamp.css"]
