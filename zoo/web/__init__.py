"""The web catalog of zoo (``zoo serve``): read-only pages and a JSON API over the catalog service.

Modules: ``app`` (the ASGI app factory, security headers, limits), ``pages`` (HTML pages),
``api`` (the JSON API and its OpenAPI description), ``answers`` (the objects both build from the
catalog service), ``catalog_access`` (the read-only catalog, uploads and the identify adapter),
``rendering`` (templates, error answers, JSON text), ``plots`` (the counts plot, drawn as SVG),
``docs`` (the Markdown pages of docs/, rendered safely), ``site`` (``zoo site``: the pages as
static files), ``templates/`` and ``static/``.
"""
