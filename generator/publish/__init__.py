"""Publish: the downloadable files, the manifest, and the atomic write of the site."""

from __future__ import annotations

from .downloads import all_data_zip, datapackage_json, network_files
from .site import MARKER, check_output_folder, manifest_json, write_site

__all__ = ["MARKER", "all_data_zip", "check_output_folder", "datapackage_json", "manifest_json",
           "network_files", "write_site"]
