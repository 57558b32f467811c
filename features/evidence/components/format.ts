export const fmtDose = (x: number | null | undefined) => (x == null ? "—" : Math.abs(x) >= 100 ? x.toFixed(0) : Math.abs(x) >= 10 ? x.toFixed(1) : Math.abs(x) >= 1 ? x.toFixed(2) : x.toPrecision(2));
export const pct = (x: number | null | undefined) => (x == null ? "—" : `${Math.round(x * 100)} %`);
export const counts = (reports: number, members: number, fish: number) =>
  `${reports} report${reports === 1 ? "" : "s"} from ${members} member${members === 1 ? "" : "s"}, ${fish} fish`;
