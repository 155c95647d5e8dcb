/** The cautions the product shows (cautions page, work orders for fire-rated doors, README). */
export const cautions = [
  {
    icon: 'directions_run',
    title: 'Keep free egress',
    text: 'Rekeying must never stop people leaving. Exit hardware must stay operable from the egress side without a key, as local life-safety codes require.',
  },
  {
    icon: 'local_fire_department',
    title: 'Fire-rated doors keep their listing',
    text: 'Use only cores and hardware that keep a fire-rated door assembly within its listing; do not modify listed hardware. Follow local fire-door rules and the authority having jurisdiction.',
  },
  {
    icon: 'gavel',
    title: 'Local codes and licensed practice',
    text: 'Corewright computes pinning and keeps records. It does not replace local codes, licensing rules or the judgement of a licensed locksmith.',
  },
  {
    icon: 'lock',
    title: 'Key records are restricted',
    text: 'Bitting lists let anyone cut keys for a building. Show them only to people who need them; every view and export is logged. Never print a bitting on a core tag.',
  },
  {
    icon: 'fact_check',
    title: 'Test before install',
    text: 'A core goes into a door only after every key check passed. A failed check is recorded and the core is rebuilt, never hidden.',
  },
] as const;
