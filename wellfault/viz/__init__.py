"""Pictures and reports: the stratigraphic position track, figures, HTML reports."""
