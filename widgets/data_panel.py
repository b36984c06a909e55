"""Data area: upload measured tables (one sample or a series) or pick the built-in demo data.

The panel reads uploaded files with :func:`kinetic.data.parse_data` (the
loader's bytes entry point) and hands the :class:`kinetic.data.Dataset` (or,
for several files, the list of them) to the workbench. A diffusivity (flash)
file is read with the choices of the "Flash data (diffusivity)" section
(:class:`~widgets.series_panel.FlashOptions`), and the files in use are read
again when a choice changes. A file the loader refuses leaves the previous
data in place; the loader's one-line message (it names the file, line and
column) is shown in the panel together with the text of the line it refers to.
"""
from __future__ import annotations

import re
from collections.abc import Callable

import ipywidgets as ipw

from . import _engine
from ._engine import DataError, KineticError
from .series_panel import FlashOptions, SampleChooser
from .style import css, fmt

__all__ = ["DataPanel", "demo_choices", "describe_dataset"]

_LINE = re.compile(r"\bline (\d+)\b")


def demo_choices() -> dict:
    """Demo data sets offered in the chooser: label -> zero-argument factory.

    Taken from :mod:`kinetic.demo` (invented, synthetic data).
    """
    demo = _engine.demo
    out = {}
    if hasattr(demo, "demo_dataset"):
        out["demo sample (invented data)"] = demo.demo_dataset
    series = getattr(demo, "demo_series", None)
    if series is not None:
        try:
            items = series()
        except Exception:  # noqa: BLE001 - a broken demo must not break the data panel
            items = []
        for i, ds in enumerate(items):
            label = getattr(ds, "label", "") or f"series sample {i + 1}"
            out[f"series: {label}"] = (lambda d=ds: d)
    return out


def describe_dataset(ds) -> str:
    """A short HTML summary of a Dataset: label, points, temperature range, columns."""
    if ds is None:
        return "<i>No measured data: the model is shown on its own.</i>"
    T = ds.temperature
    cols = ["thermal conductivity" + (" (lattice)" if ds.kind == "lattice" else " (total)")]
    if ds.kappa_err is not None:
        cols.append("its uncertainty")
    if ds.resistivity is not None:
        cols.append("resistivity")
    if ds.seebeck is not None:
        cols.append("Seebeck coefficient")
    if getattr(ds, "heat_capacity", None) is not None:
        cols[0] = cols[0].replace("thermal conductivity", "thermal conductivity from D \u03c1 c_p")
    where = ds.source or "uploaded or built in"
    if getattr(ds, "heat_capacity", None) is not None:  # a flash file: say where c_p came from
        where += f"; c_p from {ds.heat_capacity_choice or 'the file'}"
        if ds.relative_density is not None:
            where += (f"; relative density {ds.relative_density:.4g}, "
                      + (f"corrected to full density ({ds.porosity_correction})" if ds.porosity_correction
                         else "not corrected to full density"))
        where += " (see Flash data below)"
    return (f"<b>{_esc(ds.label) or '(no label)'}</b>: {len(T)} points, "
            f"{fmt(T.min())}\u2013{fmt(T.max())} K; columns: {', '.join(cols)}."
            f"<br><span style='color:#666'>from {_esc(where)}</span>")


def _esc(text) -> str:
    return (str(text).replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;"))


class DataPanel(ipw.VBox):
    """Upload or pick data; calls ``on_data(dataset)`` when new data is accepted, and
    ``on_series(datasets, index)`` for several samples at once (or another sample chosen).

    Attributes
    ----------
    upload : ipw.FileUpload
    demo_choice : ipw.Dropdown
    use_demo : ipw.Button
    summary : ipw.HTML
        Describes the data in use (CSS ``kinetic-data-summary``).
    error : ipw.HTML
        The loader's message for a refused file, with the offending line
        (CSS ``kinetic-data-error``); empty when the last load succeeded.
    flash : FlashOptions
        The "Flash data (diffusivity)" section.
    sample : SampleChooser
        The sample being fitted (shown for a series of two or more).
    use_flash_demo : ipw.Button
        Loads the engine's invented flash-measurement series.
    """

    def __init__(self, on_data: Callable, messages, loader_options: dict | None = None, *,
                 on_series: Callable | None = None):
        self._on_data = on_data
        self._on_series = on_series or (lambda series, index: on_data(series[index]))
        self._messages = messages
        self.loader_options = dict(loader_options or {})
        self._files: list = []      # (name, bytes) of the files in use, read again when a choice changes
        self._series: tuple = ()    # the samples shown (as the workbench's state holds them)
        self._loaded: tuple = ()    # the Datasets read from _files
        self.upload = ipw.FileUpload(accept=".csv,.tsv,.txt,.dat", multiple=True,
                                     description="Upload tables", layout=ipw.Layout(width="auto"))
        self.upload.tooltip = "one file per sample; choose several files for a series"
        self.upload.add_class(css("upload"))
        self._demos = demo_choices()
        self.demo_choice = ipw.Dropdown(options=list(self._demos) or ["(no demo data available)"],
                                        layout=ipw.Layout(width="17em"))
        self.use_demo = ipw.Button(description="Use demo data", disabled=not self._demos,
                                   layout=ipw.Layout(width="auto"))
        self.use_demo.add_class(css("use-demo"))
        self.summary = ipw.HTML()
        self.summary.add_class(css("data-summary"))
        self.error = ipw.HTML()
        self.error.add_class(css("data-error"))
        self.use_flash_demo = ipw.Button(description="Load the demo flash series", layout=ipw.Layout(width="auto"))
        self.use_flash_demo.tooltip = "three invented flash measurements of pellets of one compound"
        self.use_flash_demo.add_class(css("use-flash-demo"))
        self.flash = FlashOptions(self._reread, messages)
        self.sample = SampleChooser(self._chosen, messages)
        help_text = ipw.HTML(
            "<span style='color:#666;font-size:90%'>A table with a header row, e.g. "
            "<code>T [K], kappa [W/(m K)], kappa_err [W/(m K)], rho [uOhm cm], S [uV/K]</code>, "
            "or a flash measurement <code>T [K], D [mm^2/s], cp [J/(g K)]</code> with "
            "<code># density: 5.2 g/cm^3</code>. "
            "Resistivity (and Seebeck) columns allow the electronic part to be split off.</span>")
        self.upload.observe(messages.guard(self._uploaded), names="value")
        self.use_demo.on_click(messages.guard(self._demo_clicked))
        self.use_flash_demo.on_click(messages.guard(lambda _b: self.load_paths(_engine.flash_series_paths())))
        super().__init__([ipw.HBox([self.upload, self.use_flash_demo]),
                          ipw.HBox([self.demo_choice, self.use_demo]), self.sample,
                          self.summary, self.error, self.flash, help_text])
        self.add_class(css("data-panel"))

    def show(self, ds, series=()) -> None:
        """Show the data in use (``ds``, one of ``series``) and the sample chooser."""
        series = tuple(series) or ((ds,) if ds is not None else ())
        if not (len(series) == len(self._loaded) and all(a is b for a, b in zip(series, self._loaded))):
            self._files, self._loaded = [], ()  # data from elsewhere (demo, record): nothing to read again
        self._series = series
        index = next((i for i, d in enumerate(series) if d is ds), None)
        self.sample.show(series, index)
        self.summary.value = describe_dataset(ds)
        if len(series) > 1:
            self.summary.value += f"<br>Sample {index + 1} of a series of {len(series)}."
        self.flash.show(ds)

    def options(self) -> dict:
        """The loader's keyword options in use (the panel's own plus the flash choices)."""
        return {**self.loader_options, **self.flash.options()}

    # --- loading --------------------------------------------------------------------
    def load_bytes(self, content: bytes, name: str):
        """Read ``content`` (a file's bytes) as a table and use it.

        Returns the Dataset, or None when the loader refused it (the message is
        shown and the previous data are kept).
        """
        out = self.load_files([(name, bytes(content))])
        return None if out is None else out[0]

    def load_files(self, files, index: int = 0):
        """Read several files ``[(name, bytes), ...]`` as a series and use them (sample ``index`` fitted).

        Returns the list of Datasets, or None when the loader refused one of
        them (its message is shown and the previous data are kept).
        """
        files = [(str(n), bytes(c)) for n, c in files]
        if not files:
            return None
        try:
            opts = self.options()
        except KineticError as exc:
            self._refused(exc, b"")
            return None
        out = []
        for name, content in files:
            try:
                out.append(_engine.parse_data(content, name=name, **opts))
            except KineticError as exc:
                self._refused(exc, content)
                return None
        self.error.value = ""
        self._files, self._loaded = files, tuple(out)
        index = min(max(int(index), 0), len(out) - 1)
        if len(out) == 1:
            self._on_data(out[0])
        else:
            self._on_series(list(out), index)
        names = ", ".join(n.replace("\\", "/").rsplit("/", 1)[-1] for n, _ in files)
        self._messages.info(f"Loaded {names}: " + ", ".join(str(len(d.temperature)) for d in out) + " points.")
        return out

    def load_paths(self, paths, index: int = 0):
        """Read files from disk (e.g. the demo flash series) as :meth:`load_files` does."""
        files = []
        for p in paths:
            with open(p, "rb") as fh:
                files.append((str(p), fh.read()))
        return self.load_files(files, index)

    def _reread(self):
        """Read the files in use again with the current choices (the sample in use stays chosen)."""
        if not self._files:
            self._messages.info("The flash-data choices apply to the next file loaded "
                                "(the data in use were not read from a file here).")
            return None
        index = self.sample.value if self.sample.value is not None else 0
        return self.load_files(self._files, index)

    def _chosen(self, index: int):
        if 0 <= index < len(self._series):
            self._on_series(list(self._series), index)

    def _refused(self, exc, content: bytes) -> None:
        msg = " ".join(str(exc).split())
        html = f"<b>Could not use {'this file' if content else 'these choices'}.</b> {_esc(msg)}"
        m = _LINE.search(msg)
        if m:
            n = int(m.group(1))
            try:
                lines = content.decode("utf-8", errors="replace").splitlines()
            except Exception:  # noqa: BLE001
                lines = []
            if 1 <= n <= len(lines):
                html += f"<br>line {n}: <code>{_esc(lines[n - 1][:160])}</code>"
        html += "<br>The previous data are still in use."
        self.error.value = f"<div style='color:#b00020'>{html}</div>"
        self._messages.error(DataError(msg) if not isinstance(exc, DataError) else exc)

    def _uploaded(self, change):
        files = change["new"]
        if not files:
            return
        read = []
        for f in files:
            name = f.get("name", "upload") if isinstance(f, dict) else getattr(f, "name", "upload")
            content = f["content"] if isinstance(f, dict) else f.content
            read.append((name, bytes(content)))
        try:
            self.load_files(read)
        finally:
            # clear the upload so the same file can be chosen again after a fix
            self.upload.value = ()

    def _demo_clicked(self, _button=None):
        factory = self._demos.get(self.demo_choice.value)
        if factory is None:
            return
        ds = factory()
        self.error.value = ""
        self._on_data(ds)
        self._messages.info(f"Using demo data: {self.demo_choice.value}.")
