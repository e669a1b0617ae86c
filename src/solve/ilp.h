/* SPDX-License-Identifier: GPL-3.0-or-later */
/*
 * triplets.h - a sparse matrix as (row, column, value) triplets, 1-based as
 * glp_load_matrix() wants them (internal; used by the GLPK models).
 */
#ifndef KEEL_TRIPLETS_H
#define KEEL_TRIPLETS_H

#include <stdbool.h>
#include <stddef.h>

typedef struct keel_triplets {
    int *ia, *ja; /* rows and columns, [1..n] */
    double *ar;   /* values, [1..n] */
    size_t n, cap;
    bool nomem; /* an entry could not be stored */
} keel_triplets;

/* Appends one entry; on failure sets t->nomem and keeps the rest. */
/* Column 0 (no variable) is skipped. */
void keel_triplets_put(keel_triplets *t, int row, int col, double val);

/* Frees the arrays and empties t. */
void keel_triplets_fini(keel_triplets *t);

#endif
