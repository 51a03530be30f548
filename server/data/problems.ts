/** Collects upload problems (file, line, column, message) up to MAX_PROBLEMS. */
import { MAX_PROBLEMS, type DataProblem, type DataProblemDetails } from '../../shared/data';

export class ProblemList {
  private readonly items: DataProblem[] = [];
  private overflow = false;

  constructor(private readonly limit = MAX_PROBLEMS) {}

  add(file: string, message: string, line?: number, column?: number): void {
    if (this.items.length >= this.limit) {
      this.overflow = true;
      return;
    }
    const problem: DataProblem = { file, message };
    if (line !== undefined) problem.line = line;
    if (column !== undefined) problem.column = column;
    this.items.push(problem);
  }

  get count(): number {
    return this.items.length;
  }

  details(): DataProblemDetails {
    return { problems: [...this.items], truncated: this.overflow };
  }
}
