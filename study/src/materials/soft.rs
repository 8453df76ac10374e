//! Soft-magnetic B-H curves (H in A/m, B in T).

use super::entry::{Entry, Material};

struct Curve {
    name: &'static str,
    family: &'static str,
    points: &'static [[f64; 2]],
    source: &'static str,
}

const CURVES: &[Curve] = &[
    Curve {
        name: "low-carbon-steel",
        family: "solid steel",
        points: &[
            [0.0, 0.0], [16.0, 0.0025], [30.0, 0.005], [54.0, 0.0125], [93.0, 0.025], [143.0, 0.05], [191.0, 0.1], [210.0, 0.2],
            [222.0, 0.3], [233.0, 0.4], [247.0, 0.5], [258.0, 0.6], [272.0, 0.7], [289.0, 0.8], [313.0, 0.9], [342.0, 1.0],
            [377.0, 1.1], [433.0, 1.2], [509.0, 1.3], [648.0, 1.4], [933.0, 1.5], [1228.0, 1.55], [1934.0, 1.6], [2913.0, 1.65],
            [4993.0, 1.7], [7189.0, 1.75], [9423.0, 1.8], [12000.0, 1.850], [15000.0, 1.904], [20000.0, 1.985], [25000.0, 2.054],
            [30000.0, 2.112], [40000.0, 2.190], [48866.0, 2.220], [60000.0, 2.2353982], [100000.0, 2.2856637], [200000.0, 2.4113274],
        ],
        source: "TEAM Workshop Problem 13 steel (Nakata and Fujiwara, COMPEL 11(3), 1992; S32): table to 1.8 T as transcribed from a SECONDARY public copy; points above 1.8 T computed from the problem's saturation law J = a H^2 + b H + c (derived)",
    },
    Curve {
        name: "M270-35A",
        family: "non-oriented electrical steel",
        points: &[[0.0, 0.0], [40.0, 0.5], [80.0, 1.0], [150.0, 1.2], [400.0, 1.35], [1000.0, 1.43], [2500.0, 1.493], [5000.0, 1.606], [10000.0, 1.713], [100000.0, 2.0]],
        source: "EN 10106 guaranteed minimum B at 2.5, 5 and 10 kA/m (S35, SECONDARY); points below 2.5 kA/m and at 100 kA/m COMPLETED FROM MEMORY (typical fully processed NO steel), not sourced",
    },
    Curve {
        name: "M400-50A",
        family: "non-oriented electrical steel",
        points: &[[0.0, 0.0], [45.0, 0.5], [90.0, 1.0], [170.0, 1.2], [450.0, 1.36], [1000.0, 1.45], [2500.0, 1.533], [5000.0, 1.636], [10000.0, 1.743], [100000.0, 2.02]],
        source: "EN 10106 guaranteed minimum B at 2.5, 5 and 10 kA/m (S35, SECONDARY); points below 2.5 kA/m and at 100 kA/m COMPLETED FROM MEMORY (typical fully processed NO steel), not sourced",
    },
    Curve {
        name: "pure-iron",
        family: "solid iron",
        points: &[[0.0, 0.0], [100.0, 1.0], [300.0, 1.35], [1000.0, 1.5], [5000.0, 1.7], [20000.0, 1.9], [100000.0, 2.1]],
        source: "FROM MEMORY: indicative annealed pure iron (Armco-type), placeholder only; saturation polarization 2.15 T is a handbook value",
    },
    Curve {
        name: "steel-1010",
        family: "solid steel",
        points: &[[0.0, 0.0], [500.0, 0.9], [1000.0, 1.2], [2500.0, 1.45], [5000.0, 1.6], [10000.0, 1.75], [50000.0, 2.0], [150000.0, 2.2]],
        source: "FROM MEMORY: indicative 1008/1010 low-carbon steel as drawn, placeholder only (heats differ 2-3x in H at a given B)",
    },
    Curve {
        name: "grey-cast-iron",
        family: "cast iron",
        points: &[[0.0, 0.0], [400.0, 0.2], [1000.0, 0.4], [2000.0, 0.55], [5000.0, 0.75], [10000.0, 0.9], [30000.0, 1.15]],
        source: "FROM MEMORY: indicative grey cast iron; the 0.2 T at 400 A/m point is a textbook graph reading (S38, low precision)",
    },
    Curve {
        name: "stainless-430",
        family: "ferritic stainless steel",
        points: &[[0.0, 0.0], [500.0, 0.6], [1000.0, 0.9], [2500.0, 1.15], [10000.0, 1.35], [50000.0, 1.5]],
        source: "FROM MEMORY: indicative annealed 430 ferritic stainless, placeholder only (S37 qualitative)",
    },
];

pub fn lookup(name: &str) -> Option<Entry> {
    let c = CURVES.iter().find(|c| c.name == name)?;
    Some(Entry {
        name: c.name.into(),
        family: c.family.into(),
        material: Material::Soft { curve: c.points.to_vec() },
        source: c.source.into(),
    })
}

pub fn names() -> Vec<String> {
    CURVES.iter().map(|c| c.name.to_string()).collect()
}
