"""Small builders of worksheet documents for the engine tests (scenarios of our own)."""
from heatbalance.worksheet import parse_worksheet


def q(value, unit):
    return {"value": value, "unit": unit}


def temp(value, unit="degC"):
    return {"temperature": q(value, unit)}


def constant_cp_material(name="liquid A", cp=2.0, unit="kJ/(kg*K)", t_min=-50, t_max=300):
    """A single-phase liquid with constant cp: hand calculations are exact."""
    return {"name": name, "source": "test material, hand calculation",
            "phases": [{"name": "liquid", "cp": q(cp, unit)}],
            "min_temperature": q(t_min, "degC"), "max_temperature": q(t_max, "degC")}


def melting_material(name="wax", cp_solid=2.0, cp_liquid=3.0, melt=50.0, latent=200.0):
    """A solid melting to a liquid, constant cp in each phase [kJ/(kg·K)], latent heat [kJ/kg]."""
    return {"name": name, "source": "test material, hand calculation",
            "phases": [{"name": "solid", "cp": q(cp_solid, "kJ/(kg*K)"), "up_to": q(melt, "degC"),
                        "latent_heat": q(latent, "kJ/kg")},
                       {"name": "liquid", "cp": q(cp_liquid, "kJ/(kg*K)")}],
            "min_temperature": q(-50, "degC"), "max_temperature": q(300, "degC")}


def stream(name, material, flow, inlet, outlet, pressure=q(0, "barg"), **extra):
    return {"name": name, "material": material, "flow": flow, "pressure": pressure,
            "inlet": inlet, "outlet": outlet, **extra}


def sheet(**parts):
    """A worksheet dict with defaults; pass streams=, vessels=, unknowns=, ..."""
    doc = {"schema_version": 1, "title": "test", "basis": {"kind": "continuous"}}
    doc.update(parts)
    return doc


def build(**parts):
    return parse_worksheet(sheet(**parts))
