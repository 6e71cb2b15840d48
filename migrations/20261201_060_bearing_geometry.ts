import type { Knex } from "knex";

// Rolling-bearing geometry per motor, drive end (de) and non-drive end (nde), beside the nameplate columns it is
// versioned with (a change bumps assets.nameplate_version, as a nameplate change does): a designation (free text,
// e.g. "6316 C3"), the number of rolling elements Nb, the element diameter d and pitch diameter D in mm, and the
// contact angle φ in degrees. All optional; the engine computes the defect frequencies where Nb, d and D are given.
const ENDS = ["de", "nde"] as const;

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("assets", (t) => {
    for (const e of ENDS) {
      t.string(`bearing_${e}_designation`, 60);
      t.integer(`bearing_${e}_elements`);
      t.float(`bearing_${e}_element_mm`);
      t.float(`bearing_${e}_pitch_mm`);
      t.float(`bearing_${e}_contact_deg`);
    }
  });
  for (const e of ENDS) {
    await knex.raw(
      `alter table assets add constraint assets_bearing_${e}_geometry check (
         (bearing_${e}_elements is null or bearing_${e}_elements between 3 and 60)
         and (bearing_${e}_element_mm is null or bearing_${e}_element_mm > 0)
         and (bearing_${e}_pitch_mm is null or bearing_${e}_element_mm is null or bearing_${e}_pitch_mm > bearing_${e}_element_mm)
         and (bearing_${e}_contact_deg is null or (bearing_${e}_contact_deg >= 0 and bearing_${e}_contact_deg < 90)))`,
    );
  }
}

export async function down(knex: Knex): Promise<void> {
  for (const e of ENDS) await knex.raw(`alter table assets drop constraint if exists assets_bearing_${e}_geometry`);
  await knex.schema.alterTable("assets", (t) => {
    for (const e of ENDS) for (const c of ["designation", "elements", "element_mm", "pitch_mm", "contact_deg"]) t.dropColumn(`bearing_${e}_${c}`);
  });
}
