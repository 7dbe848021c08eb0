"""End-to-end test of `stoik lsp` with pytest-lsp 1.0.1.

Starts the real binary (STOIK_BIN, default target/debug/stoik), opens a demo
file with an unbalanced equation, receives its diagnostics, hovers, applies
the balance code action and sees the diagnostic disappear. Runs twice: with
the recorded capabilities of Neovim 0.7 (pushed diagnostics) and of VS Code
1.65 (pulled diagnostics).
"""

import asyncio
import os
import pathlib
import shutil

import pytest
import pytest_lsp
from lsprotocol import types
from pytest_lsp import ClientServerConfig, LanguageClient, client_capabilities

HERE = pathlib.Path(__file__).parent
ROOT = HERE.parent.parent
STOIK = os.environ.get("STOIK_BIN", str(ROOT / "target" / "debug" / "stoik"))


@pytest_lsp.fixture(
    params=["neovim@v0.7.0", "visual-studio-code@v1.65.2"],
    config=ClientServerConfig(server_command=[STOIK, "lsp"]),
)
async def client(request, lsp_client: LanguageClient, tmp_path_factory):
    work = tmp_path_factory.mktemp("work")
    (work / "stoik.toml").write_text("")
    shutil.copy(HERE / "demo.stoik", work / "demo.stoik")
    lsp_client.work = work
    params = types.InitializeParams(
        capabilities=client_capabilities(request.param),
        root_uri=work.as_uri(),
        workspace_folders=[types.WorkspaceFolder(uri=work.as_uri(), name="work")],
    )
    await lsp_client.initialize_session(params)
    yield
    await lsp_client.shutdown_session()


def apply(text: str, edits: list[types.TextEdit]) -> str:
    """Apply edits given in UTF-16 positions (the demo is ASCII)."""
    lines = text.split("\n")
    offsets = [0]
    for line in lines:
        offsets.append(offsets[-1] + len(line) + 1)
    spans = []
    for e in edits:
        a = offsets[e.range.start.line] + e.range.start.character
        b = offsets[e.range.end.line] + e.range.end.character
        spans.append((a, b, e.new_text))
    for a, b, t in sorted(spans, reverse=True):
        text = text[:a] + t + text[b:]
    return text


async def diagnostics(client: LanguageClient, uri: str, ready):
    """The document's diagnostics once `ready(list)` holds: pulled when the
    client pulls, else as pushed (waiting up to 20 s)."""
    pull = client.capabilities.text_document.diagnostic is not None
    for _ in range(200):
        if pull:
            report = await client.text_document_diagnostic_async(
                types.DocumentDiagnosticParams(
                    text_document=types.TextDocumentIdentifier(uri=uri)
                )
            )
            got = report.items
        else:
            got = client.diagnostics.get(uri)
        if got is not None and ready(got):
            return got
        await asyncio.sleep(0.1)
    raise AssertionError(f"no diagnostics as expected for {uri}: {got}")


@pytest.mark.asyncio
async def test_balance_round_trip(client: LanguageClient):
    path = client.work / "demo.stoik"
    uri = path.as_uri()
    text = path.read_text()
    client.text_document_did_open(
        types.DidOpenTextDocumentParams(
            text_document=types.TextDocumentItem(
                uri=uri, language_id="stoik", version=1, text=text
            )
        )
    )
    found = await diagnostics(client, uri, lambda ds: len(ds) > 0)
    balance = [d for d in found if d.code == "element-balance"]
    assert len(balance) == 1, found
    assert balance[0].range.start.line == 5

    # Hover on the alias shows what stoik read: CH4, 16.043 g/mol
    # (CIAAW 2021: C 12.011, H 1.008).
    hover = await client.text_document_hover_async(
        types.HoverParams(
            text_document=types.TextDocumentIdentifier(uri=uri),
            position=types.Position(line=5, character=16),
        )
    )
    assert hover is not None
    assert "C 1, H 4" in hover.contents.value
    assert "16.043" in hover.contents.value

    actions = await client.text_document_code_action_async(
        types.CodeActionParams(
            text_document=types.TextDocumentIdentifier(uri=uri),
            range=balance[0].range,
            context=types.CodeActionContext(diagnostics=balance),
        )
    )
    fix = next(a for a in actions if a.title == "balance the equation")
    edits = fix.edit.changes[uri]
    fixed = apply(text, edits)
    assert "methane + 2 O2(g) -> CO2(g) + 2 H2O(g)" in fixed

    client.text_document_did_change(
        types.DidChangeTextDocumentParams(
            text_document=types.VersionedTextDocumentIdentifier(uri=uri, version=2),
            content_changes=[types.TextDocumentContentChangeWholeDocument(text=fixed)],
        )
    )
    found = await diagnostics(
        client, uri, lambda ds: not any(d.code == "element-balance" for d in ds)
    )
    assert len(found) == 0, found
