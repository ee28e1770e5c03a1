/** What every printed document says of a unit: its code, part, order, customer and material. */
export type PrintedUnit = {
  serial: string;
  part_number: string;
  revision: string;
  part_name: string;
  order_code: string;
  customer: string;
  material_code: string;
  material_name: string;
};
