export const fmtDose = (x: number | null | undefined) =>
  x == null
    ? "—"
    : Math.abs(x) >= 100
      ? x.toFixed(0)
      : Math.abs(x) >= 10
        ? x.toFixed(1)
        : Math.abs(x) >= 1
          ? x.toFixed(2)
          : x.toPrecision(2);
export const pct = (x: number | null | undefined) => (x == null ? "—" : `${Math.round(x * 100)} %`);
export const counts = (reports: number, members: number, fish: number) =>
  `${reports} report${reports === 1 ? "" : "s"} from ${members} member${members === 1 ? "" : "s"}, ${fish} fish`;

/**
 * Classes that turn a table into stacked cards below the `sm` breakpoint (a phone), each cell led by its column's
 * name from `data-label`; from `sm` up it stays a table. The header row is hidden on phones, not removed, so
 * screen readers on wide screens keep their column headers. The rows' and cells' classes are set once on the body
 * (descendant variants) rather than on every cell: a long table would otherwise repeat them in every cell, twice
 * (in the HTML and in React's payload).
 */
export const cards = {
  table: "w-full text-left max-sm:block",
  thead: "bg-peat-50 max-sm:hidden",
  tbody: [
    "max-sm:block",
    "*:border-t *:border-peat-100 *:align-top max-sm:*:grid max-sm:*:gap-1 max-sm:*:p-3",
    "[&_:is(td,th)]:px-3 [&_:is(td,th)]:py-2 max-sm:[&_:is(td,th)]:p-0 max-sm:[&_th]:text-lg",
    "max-sm:[&_td]:before:block max-sm:[&_td]:before:text-xs max-sm:[&_td]:before:font-bold",
    "max-sm:[&_td]:before:uppercase max-sm:[&_td]:before:text-peat-700 max-sm:[&_td]:before:content-[attr(data-label)]",
  ].join(" "),
};
