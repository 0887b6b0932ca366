import { ScrollRegion } from "@/components/scroll-region";
import { ETHNICITIES, RACES, SEXES, type EnrolmentTable } from "@/lib/sponsor/enrolment";

/** The planned enrolment table: race by ethnicity and sex, cells adding up to the enrolled number. Pure rendering. */
export function EnrolmentTableView({ table }: { table: EnrolmentTable }) {
  return (
    <ScrollRegion label="Planned enrolment table">
      <table className="table text-sm" data-testid="enrolment-table">
        <thead>
          <tr>
            <th scope="col" rowSpan={2}>
              Racial categories
            </th>
            {ETHNICITIES.map((e) => (
              <th key={e} scope="colgroup" colSpan={SEXES.length} className="text-center">
                {e}
              </th>
            ))}
            <th scope="col" rowSpan={2} className="num">
              Total
            </th>
          </tr>
          <tr>
            {ETHNICITIES.flatMap((e) =>
              SEXES.map((s) => (
                <th key={`${e}-${s}`} scope="col" className="num">
                  {s}
                </th>
              )),
            )}
          </tr>
        </thead>
        <tbody>
          {RACES.map((race, r) => (
            <tr key={race}>
              <th scope="row" className="text-left font-normal">
                {race}
              </th>
              {table.cells[r]!.flat().map((n, k) => (
                <td key={k} className="num">
                  {n}
                </td>
              ))}
              <td className="num font-medium">{table.raceTotals[r]}</td>
            </tr>
          ))}
          <tr className="font-semibold">
            <th scope="row" className="text-left">
              Total
            </th>
            {table.ethnicitySexTotals.flat().map((n, k) => (
              <td key={k} className="num">
                {n}
              </td>
            ))}
            <td className="num" data-testid="enrolment-total">
              {table.total}
            </td>
          </tr>
        </tbody>
      </table>
    </ScrollRegion>
  );
}
