//! Sourced soft-magnetic curves, written by study/data/soft_curves.py from
//! the project's material tables; do not edit by hand.

/// (name, family, points as [H A/m, B T], source)
pub const SOURCED: &[(&str, &str, &[[f64; 2]], &str)] = &[
    (
        "DC01",
        "solid steel",
        &[[0.0, 0.0], [179.0, 0.1], [225.0, 0.2], [270.0, 0.3], [315.0, 0.4], [360.0, 0.5], [406.0, 0.6], [454.0, 0.7], [507.0, 0.8], [569.0, 0.9], [650.0, 1.0], [766.0, 1.1], [940.0, 1.2], [1210.0, 1.3], [1632.0, 1.4], [2284.0, 1.5], [3276.0, 1.6], [4758.0, 1.7], [6929.0, 1.8], [10047.0, 1.9], [14446.0, 2.0]],
        "DC01 (1.0330) cold-rolled low-carbon sheet, the nearest sourced proxy for AISI 1008/1010: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived), mostly 50 Hz commutating curves; fitted to data up to about 2.0 T; machined parts are softer",
    ),
    (
        "DC03",
        "solid steel",
        &[[0.0, 0.0], [76.0, 0.1], [122.0, 0.2], [167.0, 0.3], [213.0, 0.4], [259.0, 0.5], [305.0, 0.6], [351.0, 0.7], [398.0, 0.8], [448.0, 0.9], [506.0, 1.0], [582.0, 1.1], [700.0, 1.2], [902.0, 1.3], [1269.0, 1.4], [1942.0, 1.5], [3157.0, 1.6], [5300.0, 1.7], [8975.0, 1.8], [15096.0, 1.9], [25006.0, 2.0], [31952.0, 2.05]],
        "DC03 (1.0347) deep-drawing low-carbon sheet: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 2.05 T",
    ),
    (
        "9SMn28k",
        "free-machining steel",
        &[[0.0, 0.0], [76.0, 0.1], [142.0, 0.2], [207.0, 0.3], [273.0, 0.4], [339.0, 0.5], [404.0, 0.6], [470.0, 0.7], [536.0, 0.8], [604.0, 0.9], [678.0, 1.0], [776.0, 1.1], [945.0, 1.2], [1314.0, 1.3], [2201.0, 1.4], [4332.0, 1.5], [9271.0, 1.6], [20174.0, 1.7], [42960.0, 1.8], [87752.0, 1.9], [122941.0, 1.95]],
        "9SMn28k (1.0715) unleaded free-machining steel (about AISI 1213/1215): points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 1.95 T",
    ),
    (
        "9SMnPb28",
        "free-machining steel",
        &[[0.0, 0.0], [199.0, 0.1], [398.0, 0.2], [596.0, 0.3], [795.0, 0.4], [993.0, 0.5], [1192.0, 0.6], [1391.0, 0.7], [1589.0, 0.8], [1789.0, 0.9], [1991.0, 1.0], [2200.0, 1.1], [2430.0, 1.2], [2713.0, 1.3], [3119.0, 1.4], [3794.0, 1.5], [5032.0, 1.6], [7383.0, 1.7], [11842.0, 1.8]],
        "9SMnPb28 (1.0718), the material number of AISI 12L14: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 1.8 T",
    ),
    (
        "X6Cr17",
        "ferritic stainless steel",
        &[[0.0, 0.0], [244.0, 0.1], [430.0, 0.2], [588.0, 0.3], [729.0, 0.4], [860.0, 0.5], [987.0, 0.6], [1116.0, 0.7], [1262.0, 0.8], [1455.0, 0.9], [1749.0, 1.0], [2248.0, 1.1], [3123.0, 1.2], [4658.0, 1.3], [7289.0, 1.4], [11673.0, 1.5], [18748.0, 1.6], [23686.0, 1.65]],
        "X6Cr17 (1.4016) = AISI 430 ferritic stainless: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 1.65 T",
    ),
    (
        "RFe80",
        "solid iron",
        &[[0.0, 0.0], [33.0, 0.1], [45.0, 0.2], [56.0, 0.3], [68.0, 0.4], [80.0, 0.5], [91.0, 0.6], [103.0, 0.7], [114.0, 0.8], [126.0, 0.9], [139.0, 1.0], [154.0, 1.1], [173.0, 1.2], [200.0, 1.3], [243.0, 1.4], [314.0, 1.5], [434.0, 1.6], [636.0, 1.7], [971.0, 1.8], [1515.0, 1.9], [2379.0, 2.0], [3727.0, 2.1]],
        "RFe80 relay iron (coercivity class 80 A/m), the nearest sourced proxy for Armco-type soft iron: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived; may be too soft at high field); fitted to data up to about 2.1 T",
    ),
    (
        "grey-cast-iron",
        "cast iron",
        &[[0.0, 0.0], [15.1, 0.0027], [32.6, 0.0062], [88.3, 0.0206], [201.3, 0.0768], [271.4, 0.1251], [354.1, 0.1898], [451.2, 0.2589], [569.8, 0.335], [703.5, 0.403], [843.5, 0.4491], [981.2, 0.4884], [1110.1, 0.5276], [1242.2, 0.5504], [1449.1, 0.5829], [2098.5, 0.6814], [2907.8, 0.758], [3553.1, 0.8071], [4501.7, 0.8548], [5728.0, 0.9097], [7081.6, 0.96], [8463.1, 1.0066], [9597.0, 1.0375], [11170.3, 1.0725], [12153.9, 1.0985]],
        "grey cast iron (2 % Si, 2.85 % C), measured about 1900, Table IV of the electromagnetism article of the Encyclopaedia Britannica 11th ed. (1910-11) converted from cgs (S55, SECONDARY): old material, indicative only",
    ),
    (
        "M250-35A",
        "non-oriented electrical steel",
        &[[0.0, 0.0], [26.8, 0.1], [35.7, 0.2], [41.8, 0.3], [47.5, 0.4], [53.4, 0.5], [60.0, 0.6], [67.9, 0.7], [77.5, 0.8], [90.0, 0.9], [107.0, 1.0], [133.0, 1.1], [179.0, 1.2], [284.0, 1.3], [642.0, 1.4], [1810.0, 1.5], [4030.0, 1.6], [7290.0, 1.7], [11700.0, 1.8], [24000.0, 1.888], [48000.0, 1.978], [100000.0, 2.083], [200000.0, 2.209]],
        "M250-35A typical 50 Hz curve, manufacturer's table (S51, SECONDARY copy): typical, not the guaranteed minimum of EN 10106",
    ),
    (
        "M270-50A",
        "non-oriented electrical steel",
        &[[0.0, 0.0], [10.02, 0.0236], [20.02, 0.0624], [30.04, 0.1278], [40.01, 0.2278], [49.92, 0.3572], [59.98, 0.5072], [69.98, 0.6287], [79.95, 0.7339], [89.97, 0.8182], [101.99, 0.9011], [125.19, 1.0206], [150.15, 1.107], [175.44, 1.1666], [199.94, 1.2076], [250.05, 1.2623], [348.75, 1.3197], [500.01, 1.3641], [747.34, 1.4046], [1000.51, 1.4321], [1249.58, 1.4535], [1500.02, 1.4717], [1998.74, 1.5022], [2505.98, 1.5284], [5003.32, 1.6262], [7501.24, 1.699], [10001.65, 1.7579], [14980.88, 1.847], [19444.24, 1.902], [23698.52, 1.9373], [27696.0, 1.9583], [30591.27, 1.969], [32129.82, 1.9738]],
        "M270-50A measured 50 Hz curve, one sample set from the steel's maker (S52, SECONDARY): typical, not the guaranteed minimum of EN 10106",
    ),
    (
        "M330-50A",
        "non-oriented electrical steel",
        &[[0.0, 0.0], [53.0, 0.5001], [60.0, 0.6001], [69.0, 0.7001], [79.0, 0.8001], [93.0, 0.9001], [112.0, 1.0001], [141.0, 1.1002], [192.0, 1.2002], [313.0, 1.3004], [698.0, 1.4009], [1932.0, 1.5024], [4284.0, 1.6054], [7750.0, 1.7097], [13318.0, 1.8167], [19610.0, 1.9246]],
        "M330-50A typical 50 Hz curve from a manufacturer's data sheet (S53, SECONDARY; maker not named): typical, not the guaranteed minimum of EN 10106",
    ),
    (
        "M400-50A",
        "non-oriented electrical steel",
        &[[0.0, 0.0], [10.01, 0.0118], [20.02, 0.0287], [30.0, 0.0522], [40.04, 0.0838], [50.02, 0.1372], [60.0, 0.2501], [70.04, 0.397], [79.95, 0.5344], [90.15, 0.6885], [100.02, 0.8192], [125.04, 1.0323], [150.75, 1.1511], [174.99, 1.2195], [200.15, 1.2666], [249.42, 1.3229], [349.8, 1.3805], [500.2, 1.4235], [749.73, 1.4633], [1000.16, 1.4895], [1250.83, 1.5097], [1501.27, 1.5265], [1999.42, 1.5543], [2498.48, 1.5776], [4994.23, 1.6652], [7499.53, 1.7319], [9982.33, 1.7864], [15038.84, 1.8741], [19660.14, 1.9339], [24012.14, 1.9756], [28095.98, 2.0038], [31507.13, 2.0208], [32584.33, 2.0252]],
        "M400-50A measured 50 Hz curve, one sample set from the steel's maker (S52, SECONDARY; S53 agrees within 0.015 T): typical, not the guaranteed minimum of EN 10106 (1.533 T at 2.5 kA/m, S35)",
    ),
];
