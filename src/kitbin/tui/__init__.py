"""The Textual app (``kitbin ui``). Import :func:`kitbin.tui.app.make_app`."""
