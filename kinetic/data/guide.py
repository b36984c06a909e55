"""The data-file format guide: what :func:`kinetic.data.load_data` reads and how.

A data file is a text table with one header row naming the columns, then one
row per temperature.  Columns are separated by commas, semicolons, tabs or runs
of spaces (detected from the header row, or given with ``delimiter=``).

Example (``sample.csv``)::

    # label: pellet A, 2 um grains
    T [K], kappa [mW/(cm K)], kappa_err [mW/(cm K)], rho [uOhm cm], S [uV/K]
    10, 25.1, 0.8, 210, 12
    20, 48.7, 1.1, 212, 25

Columns (names are case-insensitive; spaces, dots and hyphens count as ``_``)

=================  ===========================================================  ==============
quantity           accepted names                                               SI unit stored
=================  ===========================================================  ==============
temperature        T, temp, temperature, T_avg, T_mean, T_sample                K
thermal cond.      kappa, k, lambda, thermal_conductivity (kind from ``kind=``)  W/(m K)
                   kappa_total, k_total, kappa_tot (kind "total")
                   kappa_lattice, kappa_l, kappa_lat, kappa_ph, k_l (kind
                   "lattice")
its uncertainty    kappa_err, kappa_error, dk, dkappa, sigma_kappa, err, ...    W/(m K)
resistivity        rho, resistivity, electrical_resistivity                     Ohm m
el. conductivity   sigma, conductivity, electrical_conductivity                 S/m (stored as
                                                                                resistivity)
Seebeck coeff.     S, seebeck, thermopower, seebeck_coefficient                 V/K
diffusivity        diffusivity, D, thermal_diffusivity (instead of kappa:       m^2/s
                   k = D rho c_p, see :mod:`kinetic.data.diffusivity`)
its uncertainty    diffusivity_err, D_err, dD                                   m^2/s
density            density, mass_density, rho_m (only with a diffusivity)       kg/m^3
heat capacity      cp, c_p, heat_capacity, specific_heat (only with a           J/(kg K)
                   diffusivity)
=================  ===========================================================  ==============

A diffusivity file may also carry ``# density: 5.2 g/cm^3``, ``# cp: 0.2 J/(g K)``
(or ``# cp: dulong-petit`` / ``# cp: debye``), ``# material: Mg2Si`` and
``# relative_density: 0.92`` lines; any file may carry the last one, and
``porosity_correction=`` corrects k to full density (:mod:`kinetic.porosity`).
The columns of a diffusivity file have no default units: a diffusivity,
density or heat capacity without its unit is refused.

(The full list is :data:`COLUMN_ALIASES`; ``columns={"my name": "kappa"}`` adds
your own, ``ignore_columns=["time"]`` skips extra columns.)

Units are written in square brackets (``T [K]``) or parentheses (``T (K)``)
after the name, or as ``T/K``, ``kappa / (W/m/K)`` or ``kappa/(W/(m K))``
(a name followed by "/" and no unit is refused), and are parsed with pint, so ``mW/(cm K)``,
``W m^-1 K^-1``, ``uOhm cm``, ``µΩ cm``, ``S/cm``, ``uV/K``, ``degC`` and
``degF`` all work.  Common lab spellings are understood too: ``W/mK`` and
``mW/cmK`` in a thermal-conductivity column mean W/(m K) and mW/(cm K) (not
"per millikelvin"); ``Ohm`` in any case; ``W m-1 K-1``; a bare ``C`` or ``F``
in the temperature column means degC or degF; ``°C``, ``℃`` and the Latin-1
degree sign work; inside a compound unit (``W/(m °C)``, ``uV/°C``) a degree
Celsius is a temperature difference, equal to a kelvin; ``Wm-1K-1`` is
W m^-1 K^-1.  Celsius and Fahrenheit are
offset units and are converted as such (0 degC = 273.15 K).  A unit of the
wrong kind (``kappa [K]``) is an error naming the column.  A unit may carry a
scale factor: ``rho [1e-8 Ohm m]``.  An uncertainty column in ``%`` (or any
dimensionless unit) is relative to kappa.

Defaults when a column has no unit (each use is recorded in ``Dataset.notes``)

* temperature: K
* kappa: W/(m K)
* kappa_err: the unit of the kappa column (W/(m K) if that has none either)
* rho: Ohm m (SI).  Many labs record uOhm cm (= 1e-8 Ohm m) or mOhm cm: write
  the unit in the header, or pass ``units={"rho": "uOhm cm"}``.  SI is the
  default because any lab default would be wrong for someone else.
* sigma: S/m
* S: V/K.  A unit-less Seebeck column whose values exceed 1 V/K in magnitude
  is refused (it is almost certainly in uV/K; no known solid comes near
  1 V/K, from memory the largest reported are of order 0.05 V/K).

Design decisions a user should know

* The thermal conductivity kind is "lattice" for a lattice-named column,
  "total" for a total-named column, and for a plain ``kappa`` column the
  ``kind=`` argument, else a ``# kind: lattice`` comment line, else "total".
* Comment lines start with ``#`` and may appear before the header and among
  the data; text after ``#`` on a data line is a comment too.  Comments are
  kept verbatim (with the ``#``) in ``Dataset.notes``; notes written by the
  loader have no ``#``.  ``# label: ...`` (or ``# sample: ...``) sets the
  label and ``# kind: total|lattice`` the kind, unless given as arguments.
* Decimal commas (``300,5``) are accepted when the column delimiter is not a
  comma (semicolon, tab or spaces) and no number in the file uses a decimal
  point; a note says so.  A file that mixes both marks is refused naming the
  line.  ``decimal="."`` refuses any decimal comma, ``decimal=","`` any
  decimal point.  In a comma-separated file a decimal comma shows up as an
  extra field and the error says that may be the cause.
* Text encoding: UTF-8 (with or without byte-order mark) and UTF-16 with a
  byte-order mark are read silently.  A file that is not valid UTF-8 is read
  as Windows-1252 (a superset of Latin-1, what older instrument software on
  Windows writes) and a note names the first non-UTF-8 line.  Only headers and
  comments can contain such characters, and a mis-read unit fails loudly, so
  this cannot change a number.  ``encoding="utf-8"`` makes it an error
  instead.  Files with NUL bytes (spreadsheets, binary instrument files) are
  refused with a hint to export as CSV.
* Rows out of temperature order are sorted (a note says so); rows repeating
  a temperature with identical values are merged (a note names both lines);
  repeated temperatures with different values are refused naming both lines.
* Every value must be finite; temperature > 0 K, kappa > 0, uncertainties
  > 0 (a zero uncertainty would give a point infinite weight in a fit),
  resistivity > 0, conductivity > 0.  The Seebeck coefficient may have either
  sign.  Empty fields are errors (no missing values).
* Double quotes around fields (as some spreadsheets write) are ignored;
  trailing empty columns (a header ending in a delimiter) are dropped.

Limits (each refused at once, with a message naming the limit): files of more
than 32 MB (``text.MAX_FILE_BYTES``; a clean 7 MB table reads in about a
second on a shared two-core machine, a refused one in about twice that, since
the first bad row is found by bisection), lines of more than 10 000 bytes
(``text.MAX_LINE_BYTES``), units
of more than 40 characters, with an exponent other than a plain number up to 4,
a repeated exponent or a number of more than 8 digits, or with unbalanced
parentheses (``units.MAX_UNIT_CHARS`` and friends: pint would evaluate
``10^99999999`` exactly, for minutes).  Anything that is not a regular file
(a FIFO, a device, a folder) is refused from ``os.stat`` before it is opened.
A number that may hold a thousands separator (``1,500`` in a tab- or
semicolon-separated file) is refused rather than guessed; ``decimal=","``
reads it as a decimal comma.

Options suggested by messages are named for every door: e.g.
``--ignore-column NAME (CLI) / ignore_columns=["NAME"] (Python) / "Ignore
columns" (workbench)``; :data:`kinetic.data.options.LOADER_OPTIONS` lists them.

Every problem raises :class:`kinetic.errors.DataError` with one line naming the
file, line and column, e.g.::

    data.csv, line 7, column "kappa": expected a number, got 'abc'

Speed: the numbers are parsed in one vectorised pass over the whole file; only
when that pass fails does a line-by-line pass run to find and name the first
offending line and column.

References: units via pint (https://pint.readthedocs.io); thermal-conductivity
unit conversions follow the SI brochure (BIPM 2019).
"""

#: The guide as text (shown by ``help(kinetic.data.guide)`` and linked from messages).
GUIDE: str = __doc__ or ""
