/** A physician who can be named as a study's operator. */
export interface Operator {
  id: string;
  displayName: string;
}

/** GET /api/operators: the physicians, by name. */
export interface OperatorList {
  items: Operator[];
}
