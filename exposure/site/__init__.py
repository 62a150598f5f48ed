"""A site record, read and validated, turned into the plain :class:`Site` every later stage reads.

* :mod:`~exposure.site.record`, :mod:`~exposure.site.emitters`, :mod:`~exposure.site.fields`:
  the record as strict pydantic models (the only place pydantic meets a site);
* :mod:`~exposure.site.budget`: the grid budget;
* :mod:`~exposure.site.messages`: pydantic's errors as one line per problem;
* :mod:`~exposure.site.pattern_file`: tabulated pattern cuts from CSV;
* :mod:`~exposure.site.load`: reads a file and builds the :class:`Site`
  (:mod:`~exposure.site.model`).
"""

from exposure.site.load import SUFFIXES, load_record_data, load_site, read_document, site_from_record, validate_record
from exposure.site.model import AccessPoint, Emitter, Site, Surface, WorkPosition

__all__ = [
    "SUFFIXES",
    "AccessPoint",
    "Emitter",
    "Site",
    "Surface",
    "WorkPosition",
    "load_record_data",
    "load_site",
    "site_from_record",
    "read_document",
    "validate_record",
]
