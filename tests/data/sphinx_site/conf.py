project = "Harbour lamp manual"
html_theme = "furo"
