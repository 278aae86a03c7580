//! Section 2: the inputs (the run, catchments, contaminants, climate, scenario settings).

use super::*;

// ---------------------------------------------------------------- 2. Inputs

pub(super) fn toml_text(v: &toml::Value) -> String {
    match v {
        toml::Value::String(s) => s.clone(),
        toml::Value::Integer(i) => i.to_string(),
        toml::Value::Float(f) => num_plain(*f),
        toml::Value::Boolean(b) => b.to_string(),
        toml::Value::Datetime(d) => d.to_string(),
        toml::Value::Array(a) => format!("[{}]", a.iter().map(toml_text).collect::<Vec<_>>().join(", ")),
        toml::Value::Table(t) => match distribution_text(t) {
            Some(s) => s,
            None => format!("{{ {} }}", t.iter().map(|(k, v)| format!("{k} = {}", toml_text(v))).collect::<Vec<_>>().join(", ")),
        },
    }
}

/// `{ dist = "triangular", min = .., mode = .., max = .. }` as readable text.
pub(super) fn distribution_text(t: &toml::Table) -> Option<String> {
    let kind = t.get("dist")?.as_str()?;
    // Parameters in their natural order (min, mode, max; mean, sd; …), others after.
    const ORDER: [&str; 8] = ["value", "mean", "median", "sd", "sigma_log", "min", "mode", "max"];
    let mut keys: Vec<&String> = t.keys().filter(|k| *k != "dist" && *k != "per").collect();
    keys.sort_by_key(|k| ORDER.iter().position(|o| o == k).unwrap_or(ORDER.len()));
    let params: Vec<String> = keys.iter().map(|k| format!("{k} {}", toml_text(&t[k.as_str()]))).collect();
    let per = match t.get("per").and_then(|v| v.as_str()) {
        Some("catchment") => "drawn independently for each catchment",
        _ => "one draw per member, shared by all catchments",
    };
    Some(format!("{kind}: {} ({per})", params.join(", ")))
}

/// Every distribution in the scenario: (key path, distribution text).
pub(super) fn distributions(table: &toml::Table, prefix: &str, out: &mut Vec<(String, String)>) {
    for (k, v) in table {
        let path = if prefix.is_empty() { k.clone() } else { format!("{prefix}.{k}") };
        match v {
            toml::Value::Table(t) if t.contains_key("dist") => {
                if let Some(s) = distribution_text(t) {
                    out.push((path, s));
                }
            }
            toml::Value::Table(t) => distributions(t, &path, out),
            toml::Value::Array(a) => {
                for (n, item) in a.iter().enumerate() {
                    if let toml::Value::Table(t) = item {
                        let label = t
                            .get("name")
                            .or_else(|| t.get("catchment"))
                            .and_then(|v| v.as_str())
                            .map(|s| format!("{path}[{s}]"))
                            .unwrap_or_else(|| format!("{path}[{}]", n + 1));
                        distributions(t, &label, out);
                    }
                }
            }
            _ => {}
        }
    }
}

pub(super) fn input_table_from_csv(t: &crate::report::folder::CsvTable, caption: String) -> Table {
    let numeric: Vec<bool> = (0..t.headers.len())
        .map(|c| (0..t.rows.len()).all(|r| t.text(r, c).is_empty() || t.input_number(r, c).is_some()) && !t.rows.is_empty())
        .collect();
    let keep: Vec<usize> = (0..t.headers.len()).filter(|&c| t.headers[c] != "notes").collect();
    let rows: Vec<Vec<Text>> =
        (0..t.rows.len().min(MAX_INPUT_ROWS)).map(|r| keep.iter().map(|&c| Text::new().plain(t.text(r, c))).collect()).collect();
    let note = (t.rows.len() > MAX_INPUT_ROWS)
        .then(|| Text::new().plain(format!("First {MAX_INPUT_ROWS} of {} rows; all are in ", t.rows.len())).code(&t.name).plain("."));
    Table {
        caption,
        head: keep.iter().map(|&c| t.headers[c].clone()).collect(),
        align: keep.iter().map(|&c| if numeric[c] { Align::Right } else { Align::Left }).collect(),
        rows,
        note: note
            .or_else(|| Some(Text::new().plain("As given in ").code(&t.name).plain("; units are in the column names (mm/yr, ha, kg/yr)."))),
    }
}

pub(super) fn inputs_section(d: &RunData, doc: &mut Doc) {
    let i = &d.info;
    doc.heading(2, "Inputs");
    doc.heading(3, "The run");
    let src = |k: &str| Some(Source::new("run_info.json", &[], k));
    let mut rows = vec![
        vec![Text::from("Scenario file"), Text::new().code(&i.scenario)],
        vec![Text::from("Catchment table"), Text::new().code(&i.catchment_table)],
        vec![
            Text::from("Climate table"),
            match &i.climate_table {
                Some(c) => Text::new().code(c),
                None => Text::from("none: every year uses each catchment's long-term means"),
            },
        ],
        vec![
            Text::from("Projected years"),
            Text::new().num(i.start_year.to_string(), src("start_year")).plain("–").plain(i.end_year().to_string()),
        ],
        vec![Text::from("Water-balance method"), Text::from(method_name(&i.hydrology.curves))],
        vec![Text::from("Strategies"), Text::from(i.strategies.join(", "))],
        vec![Text::from("Discount rate, per year"), Text::new().num(num_plain(i.discount_rate), src("discount_rate"))],
        vec![
            Text::from("Value of water, $/m³"),
            match i.water_value_per_m3 {
                Some(v) => Text::new().num(num_plain(v), src("water_value_per_m3")),
                None => Text::from("not given (no NPV or benefit-cost ratio)"),
            },
        ],
        vec![Text::from("Written by"), Text::from(format!("yieldshift {}", i.version))],
    ];
    if let Some(e) = &d.ensemble {
        rows.push(vec![Text::from("Ensemble members"), Text::from(fixed(e.members, 0))]);
    }
    doc.table(Table {
        caption: "What was run (run_info.json)".into(),
        head: vec!["Item".into(), "Value".into()],
        align: vec![Align::Left, Align::Left],
        rows,
        note: None,
    });

    doc.heading(3, "Catchments");
    match &d.catchment_input {
        Some(t) => {
            doc.table(input_table_from_csv(t, "The catchment table as copied into the run folder".into()));
        }
        None => doc.para(
            Text::new()
                .plain("The catchment table was not copied into this run folder (")
                .code("inputs/")
                .plain("); see the catchment names and areas in the results."),
        ),
    }

    doc.heading(3, "Contaminants");
    let rows: Vec<Vec<Text>> = i
        .contaminants
        .iter()
        .map(|c| {
            let p = |k: &str| Some(Source::new("run_info.json", &[], &format!("contaminants.{}.{k}", c.name)));
            vec![
                Text::new().code(&c.name),
                Text::new().num(num_plain(c.open_export_kg_per_ha_yr), p("open_export_kg_per_ha_yr")),
                Text::new().num(num_plain(c.forest_export_kg_per_ha_yr), p("forest_export_kg_per_ha_yr")),
                match c.guideline_mg_per_l {
                    Some(g) => Text::new().num(num_plain(g), p("guideline_mg_per_l")),
                    None => Text::from("none"),
                },
            ]
        })
        .collect();
    if !rows.is_empty() {
        doc.table(Table {
            caption: "Contaminant export coefficients and guidelines".into(),
            head: vec!["Contaminant".into(), "Open land export, kg/ha/yr".into(), "Under conifer canopy, kg/ha/yr".into(), "Guideline, mg/L".into()],
            align: vec![Align::Left, Align::Right, Align::Right, Align::Right],
            rows,
            note: Some(Text::from("Guidelines are as the scenario states them; check the basis (e.g. nitrate as N or as NO₃⁻) against the applicable standard.")),
        });
    }

    doc.heading(3, "Climate");
    climate_inputs(d, doc);

    doc.heading(3, "Scenario parameters");
    match &d.scenario {
        Some(s) => scenario_tables(s, doc),
        None => doc.para(
            Text::new()
                .plain("The scenario file was not copied into this run folder; the parameters recorded in ")
                .code("run_info.json")
                .plain(" appear in the methods section."),
        ),
    }
}

pub(super) fn climate_inputs(d: &RunData, doc: &mut Doc) {
    let Some(t) = &d.climate_input else {
        doc.para(match &d.info.climate_table {
            Some(_) => Text::from("The climate table was not copied into this run folder."),
            None => Text::from(
                "No climate table: every projected year uses each catchment's long-term mean rainfall and PET from the catchment table.",
            ),
        });
        return;
    };
    let (Some(cc), Some(yc)) = (t.col("catchment"), t.col("year")) else {
        doc.para(Text::new().plain("The climate table ").code(&t.name).plain(" has no catchment or year column."));
        return;
    };
    let rc = t.col("rain_mm");
    let pc = t.col("pet_mm");
    /// Record years and sums of one catchment's climate rows.
    struct Record {
        id: String,
        first: i64,
        last: i64,
        rows: usize,
        rain_sum: f64,
        rain_n: usize,
        pet_sum: f64,
        pet_n: usize,
    }
    let mut per: Vec<Record> = Vec::new();
    for r in 0..t.rows.len() {
        let id = t.text(r, cc).to_string();
        let Some(y) = t.input_number(r, yc).filter(|y| y.fract() == 0.0).map(|y| y as i64) else { continue };
        let idx = match per.iter().position(|p| p.id == id) {
            Some(k) => k,
            None => {
                per.push(Record { id, first: y, last: y, rows: 0, rain_sum: 0.0, rain_n: 0, pet_sum: 0.0, pet_n: 0 });
                per.len() - 1
            }
        };
        let p = &mut per[idx];
        p.first = p.first.min(y);
        p.last = p.last.max(y);
        p.rows += 1;
        if let Some(v) = rc.and_then(|c| t.input_number(r, c)) {
            p.rain_sum += v;
            p.rain_n += 1;
        }
        if let Some(v) = pc.and_then(|c| t.input_number(r, c)) {
            p.pet_sum += v;
            p.pet_n += 1;
        }
    }
    let mean = |s: f64, n: usize| if n > 0 { Text::from(fixed(s / n as f64, 0)) } else { undefined() };
    let rows: Vec<Vec<Text>> = per
        .iter()
        .map(|p| {
            vec![
                Text::new().code(&p.id),
                Text::from(format!("{}–{}", p.first, p.last)),
                Text::from(p.rows.to_string()),
                mean(p.rain_sum, p.rain_n),
                mean(p.pet_sum, p.pet_n),
            ]
        })
        .collect();
    let rule = d
        .scenario
        .as_ref()
        .and_then(|s| s.table.get("climate").and_then(|c| c.get("beyond_record")).and_then(|v| v.as_str()).map(str::to_string))
        .unwrap_or_else(|| "cycle".into());
    let rule_text = match rule.as_str() {
        "mean" => "use each catchment's long-term means",
        "error" => "are refused",
        _ => "repeat the record cyclically",
    };
    doc.table(Table {
        caption: "The annual climate record (means over each catchment's record years)".into(),
        head: vec!["Catchment".into(), "Years".into(), "Records".into(), "Mean rainfall, mm/yr".into(), "Mean PET, mm/yr".into()],
        align: vec![Align::Left, Align::Left, Align::Right, Align::Right, Align::Right],
        rows,
        note: Some(
            Text::new()
                .plain("Computed from ")
                .code(&t.name)
                .plain(format!(". Projected years outside a catchment's record {rule_text} (beyond_record = \"{rule}\").")),
        ),
    });
}

pub(super) fn scenario_tables(s: &crate::report::folder::ScenarioDoc, doc: &mut Doc) {
    // Scalars and plain tables as key/value rows; arrays of tables as their own tables.
    let mut kv: Vec<Vec<Text>> = Vec::new();
    let mut arrays: Vec<(&String, &Vec<toml::Value>)> = Vec::new();
    let is_section = |v: &toml::Value| matches!(v, toml::Value::Table(t) if !t.contains_key("dist"));
    for (k, v) in s.table.iter().filter(|(_, v)| !is_section(v)) {
        match v {
            toml::Value::Array(a) if a.iter().all(|x| x.is_table()) && !a.is_empty() => arrays.push((k, a)),
            _ => kv.push(vec![Text::new().code(k), Text::from(toml_text(v))]),
        }
    }
    for (k, v) in s.table.iter().filter(|(_, v)| is_section(v)) {
        if let toml::Value::Table(t) = v {
            for (k2, v2) in t {
                kv.push(vec![Text::new().code(format!("[{k}] {k2}")), Text::from(toml_text(v2))]);
            }
        }
    }
    doc.table(Table {
        caption: format!("Scenario settings as written in {}", s.name),
        head: vec!["Key".into(), "Value".into()],
        align: vec![Align::Left, Align::Left],
        rows: kv,
        note: Some(Text::from("Keys the scenario leaves out take their documented defaults (docs/scenario.md); the values the run used for the model core are listed in the methods section.")),
    });
    for (name, items) in arrays {
        let mut keys: Vec<String> =
            ["name", "catchment"].iter().filter(|k| items.iter().any(|it| it.get(**k).is_some())).map(|k| k.to_string()).collect();
        for it in items {
            if let Some(t) = it.as_table() {
                for k in t.keys() {
                    if !keys.contains(k) {
                        keys.push(k.clone());
                    }
                }
            }
        }
        let rows: Vec<Vec<Text>> = items
            .iter()
            .filter_map(|it| it.as_table())
            .map(|t| keys.iter().map(|k| t.get(k).map(|v| Text::from(toml_text(v))).unwrap_or_else(undefined)).collect())
            .collect();
        doc.table(Table {
            caption: format!("[[{name}]] entries of the scenario"),
            align: vec![Align::Left; keys.len()],
            head: keys,
            rows,
            note: None,
        });
    }
    let mut dists = Vec::new();
    distributions(&s.table, "", &mut dists);
    if !dists.is_empty() {
        doc.table(Table {
            caption: "Parameters given as distributions (sampled by the ensemble; the central value is used for the single projection)"
                .into(),
            head: vec!["Parameter".into(), "Distribution".into()],
            align: vec![Align::Left, Align::Left],
            rows: dists.into_iter().map(|(p, t)| vec![Text::new().code(p), Text::from(t)]).collect(),
            note: None,
        });
    } else {
        doc.para("Every parameter of this scenario is a fixed value (no distributions).");
    }
}
