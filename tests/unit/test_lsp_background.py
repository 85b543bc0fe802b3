"""The model loaded on a thread: waits, errors, exit status."""

from __future__ import annotations

import threading

import pytest

from calami.errors import CalamiError
from calami.lsp.background import BackgroundModel


def test_get_waits_for_the_loading_thread_and_loads_once():
    gate = threading.Event()
    calls = []

    def load():
        calls.append(threading.current_thread().name)
        gate.wait(5)
        return "model"

    model = BackgroundModel(load)
    model.start()
    model.start()
    result = []
    waiter = threading.Thread(target=lambda: result.append(model.get()))
    waiter.start()
    waiter.join(0.2)
    assert waiter.is_alive() and not result  # still loading: get() waits
    gate.set()
    waiter.join(5)
    assert result == ["model"] and model.get() == "model"
    assert calls == ["calami-model"]


def test_broken_model_prints_one_line_and_exits_2(capsys):
    exits = []

    def load():
        raise CalamiError("model file x is corrupt (fix: pass --model PATH)")

    model = BackgroundModel(load, exit=exits.append)
    with pytest.raises(CalamiError):
        model.get()
    assert exits == [2]
    err = capsys.readouterr().err.strip().splitlines()
    assert err == ["calami: model file x is corrupt (fix: pass --model PATH)"]


def test_unexpected_failure_is_reported_too(capsys):
    exits = []
    model = BackgroundModel(lambda: {}["missing"], exit=exits.append)
    with pytest.raises(KeyError):
        model.get()
    assert exits == [2]
    assert capsys.readouterr().err.startswith("calami: cannot load the model: KeyError")
