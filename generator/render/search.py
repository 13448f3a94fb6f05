"""The index behind the search box in every page's header: networks, nodes (id, label,
attributes), statistics, and the headings of the notes and the report's own pages.

Written as a script (``search-index.js``), not fetched JSON, so search works opened from disk.
"""

from __future__ import annotations

import json
from collections.abc import Iterable

from ..vocabulary import count_of, node_anchor, node_name, value_text
from .inputs import NetworkPageInput
from .network_page import statistic_rows
from .nodes_page import table_positions
from .notes import RenderedNote
from .site_map import CHECKS, DOWNLOADS, INDEX, METHODS, network_page, node_view, nodes_page, note_page

__all__ = ["SEARCH_INDEX", "SEARCH_MAX_NODES", "SEARCH_SCRIPT", "search_entries", "search_index"]

SEARCH_INDEX = "search-index.js"
SEARCH_SCRIPT = "static/search.js"
# Nodes of one network put in the index at most (in node order); a larger network's node table
# is searched on its own page.
SEARCH_MAX_NODES = 20000

Entry = tuple[str, str, str, str]  # (what is found, where it is, address from the root, more words)


def _node_entries(item: NetworkPageInput, node_pages: bool) -> Iterable[Entry]:
    analysis = item.analysis
    nodes = analysis.nodes
    attributes = list(analysis.attributes)
    where = f"Node of {item.title}"
    # Without node pages a node is found on the node table, so only the nodes it lists.
    listed = None if node_pages else table_positions(item)
    positions = range(min(len(nodes), SEARCH_MAX_NODES)) if listed is None else listed
    ids, labels = list(nodes.index), list(nodes["label"])
    columns = [nodes[a].tolist() for a in attributes]
    for position in positions:
        node, label = ids[position], labels[position]
        values = [value_text(column[position]) for column in columns]
        words = " ".join(v for v in values if v and v != "—")
        href = (node_view(item.id, position) if node_pages
                else f"{nodes_page(item.id)}#{node_anchor(position)}")
        yield node_name(str(label), str(node)), where, href, words


def search_entries(networks: list[NetworkPageInput], notes: dict[str, RenderedNote],
                   note_titles: dict[str, str], *, node_pages: frozenset[str] = frozenset()
                   ) -> list[Entry]:
    """Every entry, in the order results are offered when equally good: pages first, then
    networks with their statistics and nodes, then notes. ``node_pages`` names the networks
    whose nodes have a page of their own."""
    entries: list[Entry] = [
        ("Overview", "Page", INDEX, "front summary networks cautions"),
        ("Methods", "Page", METHODS, "how computed references parameters seed"),
        ("Data checks", "Page", CHECKS, "fixes refusals warnings findings"),
        ("Downloads", "Page", DOWNLOADS, "files csv graphml datapackage"),
    ]
    for item in networks:
        analysis = item.analysis
        entries.append((item.title, f"Network: {count_of(len(analysis.nodes), 'node')}",
                        network_page(item.id), item.id))
        for row in statistic_rows(analysis):
            entries.append((row.title, f"Statistic of {item.title}: {row.value}",
                            f"{network_page(item.id)}#{row.anchor}", ""))
        entries += _node_entries(item, item.id in node_pages)
    for stem, note in notes.items():
        title = note_titles.get(stem, stem)
        entries.append((title, "Note", note_page(stem), ""))
        for _, text, anchor in note.headings:
            if text != title:
                entries.append((text, f"Section of the note {title}",
                                f"{note_page(stem)}#{anchor}", ""))
    return entries


def search_index(entries: list[Entry]) -> bytes:
    """The script that holds ``entries`` (JSON; it is a file of its own, so no text in it can
    end a script element)."""
    text = json.dumps([list(e) for e in entries], ensure_ascii=False, separators=(",", ":"))
    return ("/* netfolio: what the search box in each page's header searches, read by "
            "static/search.js */\nwindow.netfolioSearch = " + text + ";\n").encode()
