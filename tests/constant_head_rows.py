"""Constant-head collections made from a known k20, for the constant-head tests."""

import numpy as np
import pandas as pd

from kitchen.water import viscosity_ratio, water_density


def collections_from_k20(k20=4.0e-4, temperatures=(18.0, 20.0, 24.0), weighed=False):
    area, length = 0.0081, 0.15
    rows = []
    for index, (head, temperature) in enumerate(zip((0.05, 0.10, 0.15), temperatures, strict=True)):
        k_t = k20 / viscosity_ratio(temperature)
        volume = k_t * head / length * area * 120.0
        rows.append(
            {
                "specimen": "S",
                "head_difference": head,
                "duration": 120.0,
                "volume": np.nan if weighed else volume,
                "outflow_mass": volume * water_density(temperature) if weighed else np.nan,
                "temperature": temperature,
                "flow_length": np.nan,
                "source_row": index + 2,
            }
        )
    state = pd.DataFrame({"specimen": ["S"], "area": [area], "height": [length]})
    return pd.DataFrame(rows), state
