"""The caution that goes with every result the tool hands to a person."""

CAUTION = (
    "soakwise gives engineering estimates from a simplified model of the part and its "
    "surroundings. Where the results bear on safety or product quality (hot surfaces, heat "
    "treatment, food cooling), check them against measurements and follow local codes, "
    "standards and licensed professional practice."
)
