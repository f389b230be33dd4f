"""The output files of ``bracegrid forces``: the member-force CSV and the force sheets, rendered in memory."""

from __future__ import annotations

from collections.abc import Sequence
from datetime import date

from bracegrid.io import OutputFile
from bracegrid.mechanics import FrameForces
from bracegrid.model import Project
from bracegrid.outputs.bundle import OutputFormat, file_slug
from bracegrid.outputs.drawing import dxf_bytes
from bracegrid.outputs.forcesheet import ForceSheet, force_sheets
from bracegrid.outputs.forcetext import render_force_csv
from bracegrid.outputs.preview import PreviewFormat, render_preview


def render_force_files(
    project: Project,
    results: Sequence[FrameForces],
    *,
    stem: str,
    formats: Sequence[OutputFormat] = (OutputFormat.DXF, OutputFormat.PNG),
    when: date | None = None,
    dpi: int = 150,
) -> tuple[tuple[ForceSheet, ...], tuple[OutputFile, ...]]:
    """Every file of a ``forces`` run (nothing is written here).

    Args:
        project: The project (frames carry the layouts the forces belong to).
        results: One force analysis per frame.
        stem: Base of the file names.
        formats: Sheet formats.
        when: Title-block date.
        dpi: PNG resolution.

    Returns:
        The sheets and the files: ``<stem>-forces.csv`` and ``<stem>-forces-<frame>[-<k>].<fmt>``.
    """
    files = [OutputFile(f"{stem}-forces.csv", render_force_csv(results).encode("utf-8"))]
    sheets: list[ForceSheet] = []
    used: set[str] = set()
    for ff in results:
        frame = project.frame(ff.frame)
        drawn = force_sheets(project, frame, ff, when=when)
        for k, sheet in enumerate(drawn, start=1):
            base = f"{stem}-forces-{file_slug(frame.name)}" + (f"-{k}" if len(drawn) > 1 else "")
            while base in used:
                base += "-x"
            used.add(base)
            sheets.append(sheet)
            for fmt in formats:
                if fmt is OutputFormat.DXF:
                    files.append(OutputFile(f"{base}.dxf", dxf_bytes(sheet.doc)))
                else:
                    data = render_preview(sheet, PreviewFormat(fmt.value), dpi=dpi)
                    files.append(OutputFile(f"{base}.{fmt.value}", data))
    return tuple(sheets), tuple(files)
