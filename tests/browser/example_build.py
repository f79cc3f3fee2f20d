"""Build the example site into a directory, without the tinctura plugin.

The configuration is copied outside the repository with an absolute ``docs_dir``, so nothing is
written into example_site/ and the build does not depend on the plugin being installed.
"""
from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

EXAMPLE = Path(__file__).resolve().parents[2] / "example_site"


def build_example_site(dest, config_dir) -> Path:
    lines = (EXAMPLE / "mkdocs.yml").read_text(encoding="utf-8").splitlines()
    kept, in_plugin = [], False
    for line in lines:  # drop the tinctura plugin entry and its indented options
        if line.strip() in ("- tinctura", "- tinctura:"):
            in_plugin, indent = True, len(line) - len(line.lstrip())
            continue
        if in_plugin and line.strip() and len(line) - len(line.lstrip()) > indent \
                and not line.lstrip().startswith("- "):
            continue
        in_plugin = False
        kept.append(line)
    config = "\n".join(kept)
    config += f"\ndocs_dir: {EXAMPLE / 'docs'}\n"
    path = Path(config_dir) / "mkdocs-example.yml"
    path.write_text(config, encoding="utf-8")
    env = dict(os.environ, NO_MKDOCS_2_WARNING="1")
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f", str(path), "-d", str(dest)],
                   check=True, env=env, cwd=config_dir)
    return Path(dest)


if __name__ == "__main__":
    import tempfile

    if len(sys.argv) != 2:
        sys.exit("usage: python tests/browser/example_build.py OUT_DIR")
    with tempfile.TemporaryDirectory() as tmp:
        print(build_example_site(Path(sys.argv[1]).resolve(), tmp))
