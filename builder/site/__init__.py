"""The published fitment reference: Markdown + SVG pages from an Analysis, built by mkdocs.

publish_site(analysis, out_dir, site_src=None, progress=None) builds the pages with mkdocs and
swaps them into place;
serve(analysis_loader, host, port) serves locally and rebuilds on change.
"""
from builder.site.publish import PublishError, publish_site
from builder.site.serve import serve

__all__ = ["PublishError", "publish_site", "serve"]
