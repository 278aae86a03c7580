//! Scenario loading through the library API: calibration entries and donors.

use std::path::Path;
use yieldshift::io::scenario::load_scenario;
use yieldshift::model::CoverCurves;

const TABLE: &str = "id,area_ha,rain_mm,pet_mm,vulnerable_ha,scattered_ha,medium_ha,dense_ha\n\
a,100,1000,800,50,1,1,1\nb,100,1100,800,50,1,1,1\nc,100,1200,800,50,1,1,1\n";

fn write(dir: &Path, extra: &str) -> std::path::PathBuf {
    std::fs::write(dir.join("c.csv"), TABLE).unwrap();
    let s = dir.join("s.toml");
    std::fs::write(&s, format!("start_year = 2027\nhorizon_years = 10\ncatchments = \"c.csv\"\n{extra}")).unwrap();
    s
}

#[test]
fn calibration_and_donor_set_per_catchment_curves() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write(tmp.path(), "[[calibration]]\ncatchment = \"a\"\nw_grass = 0.9\n\n[[calibration]]\ncatchment = \"c\"\ndonor = \"a\"\n");
    let sc = load_scenario(&s).unwrap();
    assert_eq!(sc.catchments[0].curves, Some(CoverCurves::Zhang { w_forest: 2.0, w_grass: 0.9 }));
    assert_eq!(sc.catchments[1].curves, None);
    assert_eq!(sc.catchments[2].curves, sc.catchments[0].curves);
}

#[test]
fn calibration_errors_name_the_key() {
    let tmp = tempfile::tempdir().unwrap();
    let s = write(
        tmp.path(),
        "[[calibration]]\ncatchment = \"zz\"\nw_grass = 0.9\n\n[[calibration]]\ncatchment = \"b\"\ndonor = \"c\"\n\n[[calibration]]\ncatchment = \"a\"\nomega_grass = 2.5\n",
    );
    let e = load_scenario(&s).unwrap_err();
    let msg = e.to_string();
    assert!(e.is_invalid_input());
    assert!(msg.contains("'zz' is not a catchment"), "{msg}");
    assert!(msg.contains("donor 'c' has no fitted values"), "{msg}");
    assert!(msg.contains("method is zhang"), "{msg}");
    assert!(msg.contains("calibration[1].catchment") && msg.contains("row 5"), "{msg}");
}
