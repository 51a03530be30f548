/** Cell codes of a stored adjacency matrix (row-major n*n, sender row, receiver column). */
export const TIE_ABSENT = 0;
export const TIE_PRESENT = 1;
export const TIE_MISSING = 2;
