/** One problem found in a list of input records, named by its index and field. */
export interface InputProblem {
  /** Index of the offending record in the input list. */
  index: number;
  field: string;
  message: string;
  /** Index of another record the problem refers to (the one duplicated or overlapped). */
  relatedIndex?: number;
}
