"""deltakit._text: every user string is escaped once per target language.

Hostile labels (a LaTeX comment break, commands, raw HTML, broken mathtext)
must come out as the text they are.
"""

from __future__ import annotations

import re

import pytest

from deltakit._text import CAUTION, escape_html, escape_latex, escape_markdown, escape_mathtext, one_line

HOSTILE_LATEX = [
    "x\n\\input{/etc/passwd}",
    "\\end{document}",
    "\\immediate\\write18{rm -rf ~}",
    "50% $ & # _ ^ ~ { }",
    "a\r\n%comment\n\\def\\x{1}",
]


@pytest.mark.parametrize("text", HOSTILE_LATEX)
def test_latex_escape_leaves_no_live_command_or_line_break(text):
    out = escape_latex(text)
    assert "\n" not in out and "\r" not in out
    # every backslash left starts one of the printing commands the escape writes
    for command in re.findall(r"\\[A-Za-z]+", out):
        assert command in (
            r"\textbackslash",
            r"\textasciitilde",
            r"\textasciicircum",
            r"\textless",
            r"\textgreater",
            r"\textbar",
        )
    # no unescaped special character: strip the escapes and look
    stripped = re.sub(
        r"\\(textbackslash|textasciitilde|textasciicircum|textless|textgreater|textbar)\{\}", "", out
    )
    stripped = re.sub(r"\\[&%$#_{}]", "", stripped)
    assert not re.search(r"[&%$#_{}\\^~]", stripped)


@pytest.mark.parametrize(
    "text", ["<script>alert(1)</script>", "a | b", "**bold** [link](http://x)", "`code`"]
)
def test_markdown_escape_keeps_text_plain(text):
    out = escape_markdown(text)
    assert "<" not in out and ">" not in out
    assert not re.search(r"(?<!\\)[|*`\[\]]", out)


def test_html_escape_quotes_attributes_too():
    assert escape_html('"><img src=x onerror=alert(1)>') == "&quot;&gt;&lt;img src=x onerror=alert(1)&gt;"


def test_mathtext_escape_makes_a_label_matplotlib_can_draw():
    matplotlib = pytest.importorskip("matplotlib")
    matplotlib.use("Agg", force=False)
    from matplotlib.figure import Figure

    figure = Figure()
    ax = figure.subplots()
    ax.set_title(escape_mathtext(r"burn $\frac{"))
    figure.canvas.draw()  # raises on unparsable mathtext without the escape
    assert ax.get_title() == r"burn \$\frac{"


def test_one_line_and_the_caution():
    assert one_line("a\nb\r\nc\u2028d\x00") == "a b c d"
    assert "not for flight operations" in CAUTION
