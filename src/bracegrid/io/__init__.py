"""The input/output stage: project files read and written, member references, atomic writes."""

from bracegrid.io.atomic import (
    MOVING,
    OutputFile,
    check_out_file,
    check_out_folder,
    remove_temporaries,
    replace_with_backup,
    write_atomic,
    write_bytes_atomic,
    write_outputs,
    write_text_atomic,
)
from bracegrid.io.reading import load_project, parse_project, project_from_data, read_project_text
from bracegrid.io.refs import (
    GRID_BAR_REF_HELP,
    MEMBER_REF_HELP,
    is_grid_bar_ref,
    parse_grid_bar_refs,
    parse_member_refs,
)
from bracegrid.io.writing import render_project, save_project, update_project_text

__all__ = [
    "GRID_BAR_REF_HELP",
    "MEMBER_REF_HELP",
    "MOVING",
    "OutputFile",
    "check_out_file",
    "check_out_folder",
    "is_grid_bar_ref",
    "load_project",
    "parse_grid_bar_refs",
    "parse_member_refs",
    "parse_project",
    "project_from_data",
    "read_project_text",
    "remove_temporaries",
    "render_project",
    "replace_with_backup",
    "save_project",
    "update_project_text",
    "write_atomic",
    "write_bytes_atomic",
    "write_outputs",
    "write_text_atomic",
]
