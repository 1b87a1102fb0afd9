"""Runs: planning cases, engines that evaluate them, the SQLite store, shrinking.

* :mod:`.cases` -- what a case is and how one is evaluated (the batch function);
* :mod:`.engines` -- where batches run (local processes with a watchdog; inline);
* :mod:`.store` -- the SQLite store, written only by the runner's client process;
* :mod:`.shrink` -- minimal counterexamples;
* :mod:`.runner` -- the whole run.
"""
