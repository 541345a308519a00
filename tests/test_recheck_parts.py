"""The independent re-checker on congruences, memberships and dimensions: honest
certificates from real claims are confirmed, and each altered certificate is caught."""

from __future__ import annotations

import copy
import json
from typing import Any

import pytest
from verifier import check_text
from verifier.recheck.check import CONFIRMED, FAILED, recheck
from verifier.recheck.membership import dimension, dimension_facts

# Sources: tau(n) = sigma_11(n) mod 691 (Ramanujan; Serre, A Course in Arithmetic, VII.4.5,
# from memory); tau(n) = n sigma_3(n) mod 7 and tau(n) = n sigma_9(n) mod 5 (Ramanujan, from
# memory); eta(tau)^2 eta(11 tau)^2 is the cusp form of level 11 (Diamond-Shurman, A First
# Course in Modular Forms, Sec. 3.9, from memory); E_4(tau) E_4(2 tau) has weight 8 and level 2
# (common practice); theta^4 in M_2(Gamma_0(4)) (Jacobi's four-square theorem, common practice);
# dim S_12(SL_2(Z)) = 1 (Serre, A Course in Arithmetic, VII.3.2); dim M_2(Gamma_0(11)) = 2 and
# dim S_2(Gamma_0(37)) = 2 (genera 1 and 2 of X_0(11), X_0(37): Diamond-Shurman Fig. 3.4 and
# Sec. 3.9, from memory); dim S_4(Gamma_0(13)) = 3 (from memory).
MANUSCRIPT = r"""
<!-- @claim -->
$$ \tau(n) \equiv \sigma_{11}(n) \pmod{691} $$

<!-- @claim -->
$$ \tau(n) \equiv n\sigma_{3}(n) \pmod{7} $$

<!-- @claim -->
$$ \tau(n) \equiv n\sigma_{9}(n) \pmod{5} $$

<!-- @claim -->
$$ \eta(\tau)^2\eta(11\tau)^2 \in S_2(\Gamma_0(11)) $$

<!-- @claim -->
$$ E_4(\tau) E_4(2\tau) \in M_8(\Gamma_0(2)) $$

<!-- @claim -->
$$ \theta^4 \in M_2(\Gamma_0(4)) $$

<!-- @claim -->
$$ \dim S_{12}(\Gamma_0(1)) = 1 $$

<!-- @claim -->
$$ \dim M_2(\Gamma_0(11)) = 2 $$

<!-- @claim -->
$$ \dim S_2(\Gamma_0(37)) = 2 $$

<!-- @claim -->
$$ \dim S_4(\Gamma_0(13)) = 3 $$
"""
CONGRUENCES, MEMBERSHIPS, DIMENSIONS = [0, 1, 2], [3, 4, 5], [6, 7, 8, 9]


@pytest.fixture(scope="module")
def report() -> dict[str, Any]:
    data: dict[str, Any] = json.loads(json.dumps(check_text(MANUSCRIPT, "m.md").to_dict()))
    return data


def _cert(report: dict[str, Any], index: int) -> dict[str, Any]:
    claim = report["claims"][index]
    assert claim["verdict"] == "proved", claim["message"]
    return copy.deepcopy(claim["certificate"])


def _caught(cert: dict[str, Any]) -> None:
    result = recheck(cert)
    assert result.status == FAILED, result
    assert result.reasons


def test_honest_certificates_are_confirmed(report: dict[str, Any]) -> None:
    methods = set()
    for i in CONGRUENCES + MEMBERSHIPS + DIMENSIONS:
        cert = _cert(report, i)
        result = recheck(cert)
        assert result.status == CONFIRMED, (i, result.reasons)
        methods.add(cert["method"])
    assert methods == {"sturm-congruence", "cusp-orders", "dimension-formula"}


# -- congruences ---------------------------------------------------------------------------
@pytest.mark.parametrize("index", CONGRUENCES)
def test_congruence_altered_bound_is_caught(report: dict[str, Any], index: int) -> None:
    cert = _cert(report, index)
    cert["bound"] += 1
    _caught(cert)
    cert = _cert(report, index)
    cert["prime_powers"][0]["bound"] -= 1
    _caught(cert)


@pytest.mark.parametrize("index", CONGRUENCES)
def test_congruence_altered_modulus_is_caught(report: dict[str, Any], index: int) -> None:
    cert = _cert(report, index)
    cert["modulus"] = cert["modulus"] * 3
    _caught(cert)
    cert = _cert(report, index)
    # The same prime powers listed, a different prime: 11 divides none of 691, 7, 5.
    cert["modulus"] = 11
    cert["prime_powers"][0]["prime"] = 11
    _caught(cert)


@pytest.mark.parametrize("index", CONGRUENCES)
def test_congruence_altered_coefficient_is_caught(report: dict[str, Any], index: int) -> None:
    cert = _cert(report, index)
    cert["left"]["expr"] = f"(+ {cert['left']['expr']} (q 1))"
    _caught(cert)


@pytest.mark.parametrize("index", CONGRUENCES)
def test_congruence_altered_level_weight_character_are_caught(report: dict[str, Any], index: int) -> None:
    cert = _cert(report, index)
    cert["level"] = 2
    _caught(cert)
    cert = _cert(report, index)
    cert["index"] = 3
    _caught(cert)
    cert = _cert(report, index)
    cert["pieces"][0]["weight"] = "14"
    _caught(cert)
    cert = _cert(report, index)
    cert["pieces"][0]["character"] = -4
    _caught(cert)


def test_congruence_altered_common_weight_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 1)  # mod 7: the pieces are joined in a common weight
    detail = cert["prime_powers"][0]
    assert detail.get("weight") is not None
    detail["weight"] = int(detail["weight"]) + 12  # weight 24 has Sturm bound 2, not 1
    _caught(cert)


# -- memberships -------------------------------------------------------------------------
@pytest.mark.parametrize("index", MEMBERSHIPS)
def test_membership_alterations_are_caught(report: dict[str, Any], index: int) -> None:
    honest = _cert(report, index)
    changes: list[tuple[str, Any]] = [
        ("weight", str(int(honest["space"]["weight"]) + 2)),
        ("character", -4),
        ("level", honest["space"]["level"] * 3 + 1),
    ]
    for key, value in changes:
        cert = copy.deepcopy(honest)
        cert["space"][key] = value
        _caught(cert)
    cert = copy.deepcopy(honest)
    cert["form_level"] = honest["form_level"] + 1
    _caught(cert)
    cert = copy.deepcopy(honest)
    cert["form"]["expr"] = f"(+ {honest['form']['expr']} (E 4 1))"  # a different weight added
    _caught(cert)
    cert = copy.deepcopy(honest)
    bounds = cert["cusp_order_bounds"]
    key = sorted(bounds)[0]
    bounds[key] = "99"
    _caught(cert)


def test_a_non_cusp_form_as_cusp_form_is_caught(report: dict[str, Any]) -> None:
    cert = _cert(report, 4)  # E_4(tau) E_4(2 tau) is not a cusp form
    cert["space"]["cusp_forms"] = True
    _caught(cert)


# -- dimensions ----------------------------------------------------------------------------
@pytest.mark.parametrize("index", DIMENSIONS)
def test_dimension_alterations_are_caught(report: dict[str, Any], index: int) -> None:
    honest = _cert(report, index)
    for key, delta in (("dimension", 1), ("index", 1), ("cusps", 1), ("genus", 1)):
        cert = copy.deepcopy(honest)
        cert[key] += delta
        _caught(cert)
    cert = copy.deepcopy(honest)
    cert["elliptic_points"][0] += 1
    _caught(cert)
    cert = copy.deepcopy(honest)
    cert["space"]["weight"] += 2
    _caught(cert)
    cert = copy.deepcopy(honest)
    cert["space"]["level"] += 1
    _caught(cert)


def test_dimension_formula_against_tables() -> None:
    # Diamond-Shurman, Fig. 3.4 (genus 0 for N = 1..10, 12, 13, 16, 18, 25; genus 1 for
    # N = 11, 14, 15, 17, 19, 20, 21, 24, 27, 32, 36, 49), from memory.
    for n in (1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 12, 13, 16, 18, 25):
        assert dimension_facts(n)["genus"] == 0, n
    for n in (11, 14, 15, 17, 19, 20, 21, 24, 27, 32, 36, 49):
        assert dimension_facts(n)["genus"] == 1, n
    # Level one: dim M_k = floor(k/12) (+1 unless k = 2 mod 12), Serre, A Course in
    # Arithmetic, VII.3.2.
    for k in range(0, 40, 2):
        expected = k // 12 + (0 if k % 12 == 2 else 1)
        assert dimension(k, 1, False) == expected, k
    assert dimension(3, 5, False) == 0  # odd weight, -I in Gamma_0(N): common practice


def test_cusp_forms_built_from_delta_are_confirmed() -> None:
    # Delta(2 tau) in S_12(Gamma_0(2)) and E_4 Delta in S_16(SL_2(Z)): Delta vanishes at every
    # cusp (Delta = eta^24, Ligozat's formula; Serre, A Course in Arithmetic, VII.4.4).
    text = r"""
<!-- @claim -->
$$ \Delta(2\tau) \in S_{12}(\Gamma_0(2)) $$

<!-- @claim -->
$$ E_4\Delta \in S_{16}(\Gamma_0(1)) $$
"""
    data = json.loads(json.dumps(check_text(text, "d.md").to_dict()))
    for claim in data["claims"]:
        assert claim["verdict"] == "proved", claim["message"]
        result = recheck(claim["certificate"])
        assert result.status == CONFIRMED, result.reasons
