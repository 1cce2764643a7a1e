/**
 * A facility's performance contract: when it starts, how many contract years
 * it runs, and the savings guaranteed in each year (energy in one common
 * unit, cost in the contract's currency, or both); its identification (its
 * reference, the parties, the M&V plan's reference and IPMVP option) and the
 * confidence level that governs every ± of its reports. Replaced whole by
 * each PUT, with the previous terms kept in the audit trail.
 */
import { canonicalEnergyUnit } from '../engine/index.js';
import { fromStoredJson } from '../store/baseline-content.js';
import { canonicalJson } from '../lib/canonical-json.js';
import { notFound, type FieldError, fieldErrors } from '../domain/errors.js';
import { audit, inTransaction, type Executor, type ServiceContext } from './context.js';
import { getFacilityRow } from './facilities.js';
import { bumpFacilityMeterVersions } from '../store/data-versions.js';

export interface Guarantee {
  year: number;
  energy: number | null;
  cost: number | null;
}

/** A party to the contract, e.g. { role: 'customer', name: '…' }. */
export interface ContractParty {
  role: string;
  name: string;
}

/** The IPMVP options (A: retrofit isolation, key parameter; B: retrofit isolation, all parameters; C: whole facility; D: calibrated simulation). */
export const MV_OPTIONS = ['A', 'B', 'C', 'D'] as const;
export type MvOption = (typeof MV_OPTIONS)[number];

/** The confidence level of a contract that names none (common practice for savings reports). */
export const DEFAULT_CONTRACT_CONFIDENCE = 0.9;

export interface ContractInput {
  start: string;
  years: number;
  currency?: string | null;
  energyUnit: string;
  guarantees: readonly { year: number; energy?: number | null; cost?: number | null }[];
  reference?: string | null;
  parties?: readonly ContractParty[];
  mvPlanReference?: string | null;
  mvOption?: MvOption | null;
  confidence?: number;
}

export interface Contract {
  facilityId: string;
  start: string;
  years: number;
  currency: string | null;
  energyUnit: string;
  guarantees: Guarantee[];
  updatedAt: string;
  reference: string | null;
  parties: ContractParty[];
  mvPlanReference: string | null;
  mvOption: MvOption | null;
  /** Two-sided confidence of every ± in the contract's reports unless a request names another. */
  confidence: number;
}

type ContractRow = {
  facility_id: string;
  contract_start: string;
  years: number;
  currency: string | null;
  energy_unit: string;
  guarantees_json: string;
  updated_at: string;
  reference: string | null;
  parties_json: string;
  mv_plan_reference: string | null;
  mv_option: string | null;
  confidence: number;
};

export function toContract(row: ContractRow): Contract {
  return {
    facilityId: row.facility_id,
    start: row.contract_start,
    years: row.years,
    currency: row.currency,
    energyUnit: row.energy_unit,
    guarantees: fromStoredJson<Guarantee[]>(row.guarantees_json),
    updatedAt: row.updated_at,
    reference: row.reference,
    parties: fromStoredJson<ContractParty[]>(row.parties_json),
    mvPlanReference: row.mv_plan_reference,
    mvOption: row.mv_option as MvOption | null,
    confidence: row.confidence,
  };
}

function checkContract(input: ContractInput): { energyUnit: string; guarantees: Guarantee[] } {
  const errors: FieldError[] = [];
  const energyUnit = canonicalEnergyUnit(input.energyUnit);
  if (!energyUnit)
    errors.push({
      field: 'energyUnit',
      message: `${input.energyUnit} has no standard energy factor; use kWh, MWh, therm, MMBtu, GJ or another standard energy unit`,
    });
  const seen = new Set<number>();
  const guarantees: Guarantee[] = [];
  input.guarantees.forEach((g, index) => {
    if (g.year > input.years)
      errors.push({
        field: `guarantees[${index}].year`,
        message: `contract year ${g.year} is beyond the contract's ${input.years} years`,
      });
    if (seen.has(g.year))
      errors.push({ field: `guarantees[${index}].year`, message: `contract year ${g.year} is guaranteed twice` });
    seen.add(g.year);
    const energy = g.energy ?? null;
    const cost = g.cost ?? null;
    if (energy === null && cost === null)
      errors.push({ field: `guarantees[${index}]`, message: 'give energy, cost or both' });
    if (cost !== null && !input.currency)
      errors.push({ field: `guarantees[${index}].cost`, message: 'a cost guarantee needs the contract currency' });
    guarantees.push({ year: g.year, energy, cost });
  });
  if (errors.length > 0) {
    throw fieldErrors('invalid', errors);
  }
  return { energyUnit: energyUnit!, guarantees: guarantees.sort((a, b) => a.year - b.year) };
}

export async function putContract(ctx: ServiceContext, facilityId: string, input: ContractInput): Promise<Contract> {
  const { energyUnit, guarantees } = checkContract(input);
  const organisationId = ctx.principal.organisationId;
  return inTransaction(ctx, async (trx) => {
    const facility = await getFacilityRow(trx, organisationId, facilityId);
    const old = await trx.selectFrom('contracts').selectAll().where('facility_id', '=', facility.id).executeTakeFirst();
    const row = {
      facility_id: facility.id,
      organisation_id: organisationId,
      contract_start: input.start,
      years: input.years,
      currency: input.currency ?? null,
      energy_unit: energyUnit,
      guarantees_json: canonicalJson(guarantees),
      updated_at: ctx.now,
      reference: input.reference ?? null,
      parties_json: canonicalJson(input.parties ?? []),
      mv_plan_reference: input.mvPlanReference ?? null,
      mv_option: input.mvOption ?? null,
      confidence: input.confidence ?? DEFAULT_CONTRACT_CONFIDENCE,
    };
    if (old) await trx.updateTable('contracts').set(row).where('facility_id', '=', facility.id).execute();
    else await trx.insertInto('contracts').values(row).execute();
    await bumpFacilityMeterVersions(trx, facility.id);
    const contract = toContract(row);
    await audit(trx, ctx, {
      action: 'put-contract',
      entityType: 'facility',
      entityId: facility.id,
      before: old ? toContract(old) : null,
      after: contract,
    });
    return contract;
  });
}

export async function getContract(db: Executor, organisationId: string, facilityId: string): Promise<Contract> {
  const facility = await getFacilityRow(db, organisationId, facilityId);
  const row = await db.selectFrom('contracts').selectAll().where('facility_id', '=', facility.id).executeTakeFirst();
  if (!row) throw notFound('contract of facility', facilityId);
  return toContract(row);
}
