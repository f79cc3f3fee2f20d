"""Settings: one table for the configuration file, the command line and the plugin."""
import json

import pytest

from tinctura import config, rules
from tinctura.plugin import TincturaPlugin
from tinctura.report.json_report import expand

from gate_helpers import call, site  # noqa: F401  (site: a fixture)


def write_pyproject(folder, body: str):
    (folder / "pyproject.toml").write_text(
        '[project]\nname = "kestrow-handbook"\n\n[tool.tinctura]\n' + body, encoding="utf-8")


def test_pyproject_settings_take_effect(site, tmp_path):
    assert call("check", site, "--jobs", 1)[0] == 1
    write_pyproject(tmp_path, 'fail_on = "never"\n')
    assert call("check", site, "--jobs", 1)[0] == 0


def test_site_dir_from_the_configuration(site, tmp_path):
    write_pyproject(tmp_path, 'site_dir = "site"\nreport = ["json"]\n')
    status, out, _ = call("check", "--jobs", 1)
    assert status == 1 and len(expand(json.loads(out))) == 2


def test_missing_site_dir_is_named(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    write_pyproject(tmp_path, 'site_dir = "public"\n')
    status, out, err = call("check")
    assert status == 2 and out == ""
    assert "public: the built site named by site_dir in" in err and "build the site" in err
    assert err.count("\n") == 1


@pytest.mark.parametrize("body, needle", [
    ('levle = "AAA"\n', "levle: unknown setting (did you mean level?)"),
    ('level = "A"\n', "level: expected one of AA, AAA, got 'A'"),
    ('viewport_width = "wide"\n', "viewport_width: expected a whole number, got a string"),
    ("viewport_width = 0\n", "viewport_width: expected a number of at least 1, got 0"),
    ('states = "yes"\n', "states: expected true or false"),
    ('select = ["TC999"]\n', "select: unknown rule 'TC999'"),
    ('[tool.tinctura.severity]\ntext-ratio = "fatal"\n', "severity: text-ratio: expected one of"),
    ('report = ["pdf:out.pdf"]\n', "report: unknown format 'pdf'"),
    ('allow = [{pages = "tuning/*"}]\n', "allow: entry 1: a reason is required"),
    ('allow = [{selector = "p[", reason = "x"}]\n', "allow: entry 1: selector 'p[' cannot"),
    ("log_every = true\n", "log_every: unknown setting"),  # the plugin's own
    ("level = \n", "not valid TOML"),
])
def test_bad_settings_exit_2_with_one_line(site, tmp_path, body, needle):
    write_pyproject(tmp_path, body)
    status, out, err = call("check", site)
    assert status == 2 and out == ""
    assert err.startswith(f"tinctura: error: {tmp_path / 'pyproject.toml'}: ")
    assert needle in err and err.count("\n") == 1


def test_tinctura_toml_is_found_from_a_subfolder(site, tmp_path, monkeypatch):
    (tmp_path / "tinctura.toml").write_text('fail_on = "never"\n', encoding="utf-8")
    monkeypatch.chdir(site.root / "tuning")
    assert call("check", site.root, "--jobs", 1)[0] == 0


def test_pyproject_without_the_table_is_skipped(site, tmp_path, monkeypatch):
    (tmp_path / "tinctura.toml").write_text('fail_on = "never"\n', encoding="utf-8")
    sub = tmp_path / "sub"
    sub.mkdir()
    (sub / "pyproject.toml").write_text('[project]\nname = "x"\n', encoding="utf-8")
    assert config.discover(str(sub)) == str(tmp_path / "tinctura.toml")


def test_flags_override_the_file(site, tmp_path):
    write_pyproject(tmp_path, 'fail_on = "never"\n')
    assert call("check", site, "--fail-on", "error", "--jobs", 1)[0] == 1
    assert call("check", site, "--no-config", "--jobs", 1)[0] == 1


def test_config_flag_names_the_file(site, tmp_path):
    other = tmp_path / "ci.toml"
    other.write_text('fail_on = "never"\n', encoding="utf-8")
    assert call("check", site, "--config", other, "--jobs", 1)[0] == 0
    status, _, err = call("check", site, "--config", tmp_path / "nope.toml")
    assert status == 2 and "nope.toml: no such configuration file" in err


def test_config_can_be_an_mkdocs_yml(site, tmp_path):
    (tmp_path / "mkdocs.yml").write_text(
        "site_name: Kestrow handbook\nplugins:\n  - search\n  - tinctura:\n"
        "      fail_on: never\n      log_every: true\n", encoding="utf-8")
    loaded = config.load(str(tmp_path / "mkdocs.yml"))
    assert loaded.mkdocs_config == str(tmp_path / "mkdocs.yml")  # for Markdown source maps
    assert loaded.values["site_dir"] == str(tmp_path / "site")
    assert call("check", "--config", tmp_path / "mkdocs.yml", "--jobs", 1)[0] == 0
    (tmp_path / "mkdocs.yml").write_text(
        "site_name: K\nplugins:\n  - tinctura:\n      levle: AAA\n", encoding="utf-8")
    status, _, err = call("check", "--config", tmp_path / "mkdocs.yml")
    assert status == 2 and "plugins.tinctura: levle: unknown setting" in err


def test_mkdocs_config_points_sarif_at_the_markdown_source(site, tmp_path):
    (tmp_path / "docs" / "tuning").mkdir(parents=True)
    (tmp_path / "docs" / "index.md").write_text("# Casting\n")
    (tmp_path / "docs" / "tuning.md").write_text("# Tuning\n")
    (tmp_path / "mkdocs.yml").write_text("site_name: K\nplugins:\n  - tinctura\n")
    status, out, _ = call("check", "--config", "mkdocs.yml", "--format", "sarif-findings",
                          "--jobs", 1)
    uris = sorted(r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
                  for r in json.loads(out)["runs"][0]["results"])
    assert status == 1 and uris == ["docs/index.md", "docs/tuning.md"]


def test_relative_paths_in_a_file_are_relative_to_it(tmp_path):
    (tmp_path / "tinctura.toml").write_text(
        'baseline = "ci/baseline.json"\nreport = ["sarif:out/r.sarif", "text"]\n')
    values = config.load(str(tmp_path / "tinctura.toml")).values
    assert values["baseline"] == str(tmp_path / "ci" / "baseline.json")
    assert values["report"] == [("sarif", str(tmp_path / "out" / "r.sarif")), ("text", None)]


def test_every_default_passes_its_own_check():
    for s in config.SETTINGS:
        assert s.check(config._copy(s.default)) == s.default, s.name


def test_plugin_options_are_the_tables():
    plugin_names = {s.name for s in config.SETTINGS if "plugin" in s.where}
    plugin = TincturaPlugin()
    assert plugin.load_config({}) == ([], [])
    assert set(dict(plugin.config)) == plugin_names


# -- rule selection: one implementation --------------------------------------------------------


def test_selection_by_code_or_slug():
    assert rules.selection(["text-ratio"], []) == ("TC100",)
    assert rules.selection([], []) == ()  # every rule
    with pytest.raises(ValueError, match="leave no rule"):
        rules.selection([], [r.code for r in rules.RULES])
    assert "TC100" not in rules.selection([], ["TC100"])


def test_cli_and_plugin_build_the_same_options(site):
    from tinctura import cli

    args = cli.build_parser().parse_args(
        ["check", str(site), "--select", "text-ratio", "--severity", "TC100=warning",
         "--no-config"])
    cli.settle(args, "check")
    from_cli = cli.options_from(args)
    plugin = TincturaPlugin()
    plugin.load_config({"select": ["text-ratio"], "severity": {"TC100": "warning"}})
    from_plugin = plugin.engine_options()
    assert (from_cli.rules, from_cli.severity) == (from_plugin.rules, from_plugin.severity) \
        == (("TC100",), (("TC100", "warning"),))


def test_severity_override_changes_the_exit_status(site, tmp_path):
    status, out, _ = call("check", site, "--severity", "text-ratio=warning", "--format", "json",
                          "--jobs", 1)
    assert status == 0  # fail_on error, and the findings are warnings now
    assert {f["severity"] for f in expand(json.loads(out))} == {"warning"}
    write_pyproject(tmp_path, '[tool.tinctura.severity]\nTC100 = "warning"\n')
    assert call("check", site, "--jobs", 1)[0] == 0
    assert call("check", site, "--jobs", 1, "--fail-on", "warning")[0] == 1


def test_ignoring_every_rule_is_a_usage_error(site):
    status, _, err = call("check", site, "--ignore", ",".join(r.code for r in rules.RULES))
    assert status == 2 and "leave no rule to run" in err


def test_pre_commit_hook_checks_the_configured_site_without_building():
    import pathlib

    import yaml

    hooks = yaml.safe_load((pathlib.Path(__file__).resolve().parents[2] /
                            ".pre-commit-hooks.yaml").read_text())
    assert [(h["id"], h["entry"], h["pass_filenames"]) for h in hooks] == [
        ("tinctura", "tinctura check", False)]


def test_without_a_site_or_configuration_the_message_says_what_to_do(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    status, out, err = call("check")
    assert status == 2 and out == "" and "set site_dir in the configuration" in err


def test_pairs_reads_the_configuration_too(site, tmp_path):
    write_pyproject(tmp_path, 'exclude = ["tuning/*"]\n')
    status, out, _ = call("pairs", site, "--jobs", 1)
    assert status == 0 and {json.loads(line)["page"] for line in out.splitlines()} == {"index.html"}
