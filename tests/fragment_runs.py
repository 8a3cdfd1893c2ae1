"""AppTest runs asked for the way the browser asks for them, and timed inside the script thread.

AppTest (streamlit 1.67) asks for a run of the whole script after every widget change. The browser asks
for a run of the fragment that drew the widget: each element arrives with the id of the fragment it was
drawn in (``Delta.fragment_id``), and a change of a widget with one is sent with that id
(``ClientState.fragment_id``). Inside :func:`browser_runs`, every AppTest run records which fragment drew
each widget (from the run's own messages), :meth:`Runs.interact` sends the next run as the browser would,
and each run's time is taken from the script runner's own start and stop events (callbacks included,
AppTest's parsing of the messages not).

This reaches into AppTest's script runner (``LocalScriptRunner``): a streamlit upgrade that changes it
makes these runs fail loudly, never pass silently.
"""
from __future__ import annotations

import dataclasses
import time
from contextlib import contextmanager

from streamlit.runtime.scriptrunner import ScriptRunnerEvent
from streamlit.runtime.scriptrunner_utils.script_requests import ScriptRequests
from streamlit.testing.v1.local_script_runner import LocalScriptRunner

__all__ = ["Runs", "browser_runs"]

_STOPPED = {ScriptRunnerEvent.SCRIPT_STOPPED_WITH_SUCCESS, ScriptRunnerEvent.FRAGMENT_STOPPED_WITH_SUCCESS,
            ScriptRunnerEvent.SCRIPT_STOPPED_WITH_COMPILE_ERROR}


@dataclasses.dataclass
class Runs:
    """What the runs inside :func:`browser_runs` did."""

    fragment_of: dict[str, str] = dataclasses.field(default_factory=dict)  # widget id -> its fragment id
    kinds: list[str] = dataclasses.field(default_factory=list)  # each script run: "app" or "fragment"
    seconds: list[float] = dataclasses.field(default_factory=list)  # each request: start -> last stop
    _next_fragment: str | None = None
    _started: float | None = None
    _last_stop: float = 0.0

    def interact(self, widget):
        """Run after ``widget`` changed (``set_value``, ``click``…), as the browser asks: only the fragment
        that drew it, else the whole script. Returns the AppTest, as ``widget.run()`` does."""
        self._next_fragment = self.fragment_of.get(widget.id)
        return widget.run()

    def in_fragment(self, widget) -> bool:
        """Whether the last run drew ``widget`` inside a fragment."""
        return widget.id in self.fragment_of

    # -- the hooks into the script runner
    def _read(self, messages) -> None:
        for message in messages:
            element = message.delta.new_element
            kind = element.WhichOneof("type") if message.HasField("delta") else None
            widget_id = getattr(getattr(element, kind), "id", "") if kind else ""
            if widget_id:
                if message.delta.fragment_id:
                    self.fragment_of[widget_id] = message.delta.fragment_id
                else:
                    self.fragment_of.pop(widget_id, None)

    def _event(self, sender, event, **data) -> None:
        if event == ScriptRunnerEvent.SCRIPT_STARTED:
            self.kinds.append("fragment" if data.get("fragment_ids_this_run") else "app")
            if self._started is None:
                self._started = time.perf_counter()
        elif event in _STOPPED and self._started is not None:
            self._last_stop = time.perf_counter()

    def _request(self, runner, rerun_data):
        """The run request as the browser sends it; a fragment's replaces AppTest's first, full-run one."""
        if self._next_fragment is None:
            return rerun_data
        runner._requests = ScriptRequests()  # AppTest starts each runner with a request for a full run
        rerun_data = dataclasses.replace(rerun_data, fragment_id=self._next_fragment)
        self._next_fragment = None
        return rerun_data


@contextmanager
def browser_runs():
    """AppTest runs, inside the block, asked for as the browser asks for them (see the module docstring)."""
    runs = Runs()
    run, request_rerun = LocalScriptRunner.run, LocalScriptRunner.request_rerun

    def recorded_run(self, *args, **kwargs):
        self.on_event.connect(runs._event, weak=False)
        runs._started = None
        try:
            return run(self, *args, **kwargs)
        finally:
            if runs._started is not None:
                runs.seconds.append(runs._last_stop - runs._started)
            runs._read(self.forward_msgs())

    def browser_request(self, rerun_data):
        return request_rerun(self, runs._request(self, rerun_data))

    LocalScriptRunner.run, LocalScriptRunner.request_rerun = recorded_run, browser_request
    try:
        yield runs
    finally:
        LocalScriptRunner.run, LocalScriptRunner.request_rerun = run, request_rerun
