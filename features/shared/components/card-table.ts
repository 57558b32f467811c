/**
 * Class names that turn a server-rendered <table> into stacked cards under 640 px, each cell led by its column's
 * name from `data-label`; from 640 px up it stays a table. (Client tables get the same from TableView.)
 */
export const cardTable = {
  wrap: "sm:overflow-x-auto sm:rounded-lg sm:border sm:border-peat-100 sm:bg-white",
  table: "w-full text-left max-sm:block",
  thead: "bg-peat-50 max-sm:hidden",
  tbody: "max-sm:grid max-sm:gap-3",
  tr: "border-t border-peat-100 align-top max-sm:grid max-sm:gap-1.5 max-sm:rounded-lg max-sm:border max-sm:bg-white max-sm:p-3",
  th: "px-3 py-2",
  cell: "px-3 py-2 max-sm:grid max-sm:grid-cols-[minmax(5rem,30%)_minmax(0,1fr)] max-sm:gap-2 max-sm:p-0 max-sm:before:font-bold max-sm:before:text-peat-700 max-sm:before:content-[attr(data-label)]",
};
