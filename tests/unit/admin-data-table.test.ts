import { describe, expect, it } from "vitest";
import {
  clampPage,
  nextSort,
  pageCount,
  pageSlice,
  rangeText,
  sortRows,
  type DataColumn,
} from "@/components/data-table";

type Row = { id: number; name: string; bar: number | null; on: boolean };
const rows: Row[] = [
  { id: 1, name: "Unit 10", bar: 300, on: true },
  { id: 2, name: "unit 2", bar: null, on: false },
  { id: 3, name: "Unit 1", bar: 420, on: true },
  { id: 4, name: "Alpha", bar: 200, on: false },
  { id: 5, name: "", bar: 300, on: true },
];
const col = (id: string, sortValue: DataColumn<Row>["sortValue"]): DataColumn<Row> => ({ id, header: id, cell: () => null, sortValue });
const columns = [col("name", (r) => r.name), col("bar", (r) => r.bar), col("on", (r) => r.on), { id: "x", header: "x", cell: () => null }];
const ids = (rs: Row[]) => rs.map((r) => r.id);

describe("sortRows", () => {
  it("leaves the order alone without a sort or for a column without a sort value", () => {
    expect(ids(sortRows(rows, columns, null))).toEqual([1, 2, 3, 4, 5]);
    expect(ids(sortRows(rows, columns, { columnId: "x", direction: "asc" }))).toEqual([1, 2, 3, 4, 5]);
  });

  it("sorts text case-insensitively with numbers in numeric order, empties last", () => {
    expect(ids(sortRows(rows, columns, { columnId: "name", direction: "asc" }))).toEqual([4, 3, 2, 1, 5]);
    expect(ids(sortRows(rows, columns, { columnId: "name", direction: "desc" }))).toEqual([1, 2, 3, 4, 5]);
  });

  it("sorts numbers, keeps ties in their original order and empties last in both directions", () => {
    expect(ids(sortRows(rows, columns, { columnId: "bar", direction: "asc" }))).toEqual([4, 1, 5, 3, 2]);
    expect(ids(sortRows(rows, columns, { columnId: "bar", direction: "desc" }))).toEqual([3, 1, 5, 4, 2]);
  });

  it("sorts booleans false first", () => {
    expect(ids(sortRows(rows, columns, { columnId: "on", direction: "asc" }))).toEqual([2, 4, 1, 3, 5]);
  });

  it("does not change the input", () => {
    const copy = [...rows];
    sortRows(rows, columns, { columnId: "bar", direction: "desc" });
    expect(rows).toEqual(copy);
  });
});

describe("nextSort", () => {
  it("starts ascending and flips on the same column", () => {
    expect(nextSort(null, "name")).toEqual({ columnId: "name", direction: "asc" });
    expect(nextSort({ columnId: "name", direction: "asc" }, "name")).toEqual({ columnId: "name", direction: "desc" });
    expect(nextSort({ columnId: "name", direction: "desc" }, "name")).toEqual({ columnId: "name", direction: "asc" });
    expect(nextSort({ columnId: "name", direction: "desc" }, "bar")).toEqual({ columnId: "bar", direction: "asc" });
  });
});

describe("paging", () => {
  const many = Array.from({ length: 53 }, (_, i) => i);
  it("counts pages, at least one", () => {
    expect(pageCount(53, 25)).toBe(3);
    expect(pageCount(50, 25)).toBe(2);
    expect(pageCount(0, 25)).toBe(1);
    expect(pageCount(53, 0)).toBe(1);
  });

  it("clamps the page into range", () => {
    expect(clampPage(-1, 53, 25)).toBe(0);
    expect(clampPage(7, 53, 25)).toBe(2);
    expect(clampPage(1.7, 53, 25)).toBe(1);
    expect(clampPage(3, 0, 25)).toBe(0);
  });

  it("slices a page, clamping after rows shrink", () => {
    expect(pageSlice(many, 0, 25)).toEqual(many.slice(0, 25));
    expect(pageSlice(many, 2, 25)).toEqual([50, 51, 52]);
    expect(pageSlice(many.slice(0, 10), 2, 25)).toEqual(many.slice(0, 10));
    expect(pageSlice(many, 1, 0)).toEqual(many);
  });

  it("describes the visible range", () => {
    expect(rangeText(0, 25, 53)).toBe("Rows 1–25 of 53");
    expect(rangeText(2, 25, 53)).toBe("Rows 51–53 of 53");
    expect(rangeText(0, 25, 0)).toBe("No rows");
  });
});
