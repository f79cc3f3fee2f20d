"""A small built site for tests: a stylesheet and numbered pages, each in its own folder."""


def write_pages(root, css: str, page_of, count: int, prefix: str = "p"):
    """``root`` with ``site.css`` holding ``css`` and ``{prefix}{n}/index.html`` holding
    ``page_of(n)`` for ``n`` below ``count``; returns ``root``."""
    (root / "site.css").write_text(css)
    for n in range(count):
        (root / f"{prefix}{n}").mkdir()
        (root / f"{prefix}{n}" / "index.html").write_text(page_of(n))
    return root
