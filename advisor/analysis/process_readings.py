"""The process readings an assessment adds on request: quench outputs (cooling rates, times
to temperatures, time through a range) and the freezing comparison (the field's freezing time
beside Plank's and Pham's), with the checks of those requests."""

from __future__ import annotations

from ..errors import AdvisorError
from .freezing import FreezingComparison, FreezingProduct, compare_freezing
from .lumped import mean_coefficient
from .quench import quench_outputs


def check_outputs(drive, cooling_range, freezing, freeze_to) -> None:
    """The quench and freezing requests (their values are checked where they are used)."""
    if cooling_range is not None:
        quench_outputs([0.0, 1.0, 2.0], {}, drive=drive, cooling_range=cooling_range)
    if freezing is not None and freeze_to is None:
        raise AdvisorError(
            "freezing (the product's FreezingProduct) needs freeze_to, the temperature in "
            "degC that counts as frozen"
        )
    if freezing is not None and not isinstance(freezing, FreezingProduct):
        raise AdvisorError(f"freezing must be a FreezingProduct, got {freezing!r}")


def freezing_product(model, lumped, freezing, freeze_to) -> FreezingProduct | None:
    """The product for the hand calculations: the one given, or the material with latent
    heat that fills most of the section (None without ``freeze_to``)."""
    if freeze_to is None:
        return None
    if freezing is not None:
        return freezing
    volumes = model.section.facts.region_volumes
    freezing_regions = [
        (volumes[r], m)
        for r, m in model.materials.items()
        if getattr(m, "latent_heat", 0) or getattr(m, "specific_enthalpy", None) is not None
    ]
    if not freezing_regions:
        raise AdvisorError(
            "freeze_to needs a material with latent heat (latent_heat with solidus and "
            "liquidus, or an enthalpy table) or a FreezingProduct given as freezing"
        )
    _, material = max(freezing_regions, key=lambda pair: pair[0])
    # Above the liquidus for a latent-heat material; an enthalpy table finds its own point.
    liquidus = getattr(material, "liquidus", None)
    unfrozen = lumped.initial_temperature
    if liquidus is not None:
        unfrozen = max(unfrozen, liquidus + 1.0)
    return FreezingProduct.of_material(
        material, unfrozen_temperature=unfrozen, frozen_temperature=freeze_to
    )


def freezing_comparison(
    solution, lumped, biot, product, end_temperature, slowest
) -> FreezingComparison:
    """Plank's and Pham's freezing times beside the field's: d is the largest conduction
    distance, E = d/(V/A_s), h the mean coefficient at the freezing point and T_a the lumped
    ambient."""
    by_name = {b.name: b for b in biot}
    distance = by_name["conduction_distance"].length
    return compare_freezing(
        product,
        solution.times,
        slowest,
        end_temperature=end_temperature,
        initial_temperature=lumped.initial_temperature,
        half_thickness=distance,
        shape=distance / by_name["volume_to_surface"].length,
        heat_transfer_coefficient=mean_coefficient(solution.model, product.freezing_point, 0.0),
        medium_temperature=lumped.ambient,
    )
