"""routes(), advise() and smallest_known(): facts from the literature, and the CLI's --json."""

import pytest

import hadamard_registry as hr
from conftest import cli_json, needs_cli


def test_statuses_from_the_literature():
    # A Hadamard order is 1, 2 or a multiple of 4 (references.md#r1-impossible-orders); 668,
    # 716, 892 and 1132 are the open orders up to 1208 and every other multiple of 4 there is
    # known (references.md#r3-open-orders).
    assert hr.routes(10)["status"] == "impossible"
    for n in (668, 716, 892, 1132):
        assert hr.routes(n)["status"] == "open"
    assert hr.routes(428)["status"] in ("known", "constructible")
    # Paley's first construction gives order q + 1 for a prime q ≡ 3 mod 4
    # (references.md#r2-paley-and-kronecker-up-to-100): 12 from 11.
    assert any(r["method"] == "paley_one" and r["buildable"] for r in hr.routes(12)["routes"])


def test_smallest_known_skips_the_open_order_668():
    # 668 is open and 672 is known (references.md#r3-open-orders).
    r = hr.smallest_known(at_least=665)
    assert r["smallest_known"]["order"] == 672
    assert r["at_least"] == 665


def test_dimension_advice_factors_exactly():
    for d in [12, 172, 3584, 14336, 4096, 11008]:
        a = hr.advise(dimension=d)
        assert a["dimension"] == d
        for f in a["options"] + a["blocked"]:
            assert (1 << f["power_of_two"]) * f["dense"] == d
        dense = [f["dense"] for f in a["options"]]
        assert dense == sorted(dense)
    # 4096 = 2^12: Sylvester's matrix alone, no dense factor.
    assert hr.advise(dimension=4096)["options"][0]["dense"] == 1
    # 6 is not a Hadamard order, nor a power of two times one (references.md#r1-impossible-orders).
    assert hr.advise(dimension=6)["options"] == []


@needs_cli
@pytest.mark.parametrize("n", [1, 12, 92, 428, 668, 1000, 2004])
def test_routes_are_the_clis(n):
    assert hr.routes(n) == cli_json("routes", str(n))


@needs_cli
@pytest.mark.parametrize("d", [12, 172, 14336, 6])
def test_advice_is_the_clis(d):
    assert hr.advise(dimension=d) == cli_json("advise", "--dimension", str(d))


@needs_cli
@pytest.mark.parametrize("k", [1, 13, 665, 1000])
def test_smallest_known_is_the_clis(k):
    assert hr.smallest_known(at_least=k) == cli_json("advise", "--at-least", str(k))
