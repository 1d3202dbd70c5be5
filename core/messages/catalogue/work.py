"""Messages about where the long work runs: this computer's cores or a Dask cluster."""

ENTRIES = [
    ("work.no_dask", "refused", "Running on a cluster needs Dask's distributed scheduler, "
     "which is not installed.", "Install it with pip install -e \".[cluster]\", or run on this "
     "computer."),
    ("work.cluster_address", "refused", "{address!r} is not the address of a Dask scheduler.",
     "Give it as tcp://host:port, for example tcp://10.0.0.5:8786 (what 'dask scheduler' "
     "prints), or run on this computer."),
    ("work.cluster_unreachable", "refused", "No Dask scheduler answered at {address!r} within "
     "{seconds} seconds.", "Check the address (for example tcp://10.0.0.5:8786) and that "
     "'dask scheduler' is running there, or run on this computer."),
]
