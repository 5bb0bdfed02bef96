"""The published fitment reference: Markdown + SVG pages from an Analysis, built by mkdocs.

build_site(analysis, out_dir, site_src=None, progress=None) builds and swaps into place;
serve(analysis_loader, host, port) serves locally and rebuilds on change.
"""
from builder.site.build import SiteBuildError, build_site
from builder.site.serve import serve

__all__ = ["SiteBuildError", "build_site", "serve"]
