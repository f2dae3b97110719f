/* assemble.c: pattern and scatter. Invariants: see assemble.h. */
#include "assemble.h"

#include <stdlib.h>

static int upper_index(int a, int b) { return a * 12 - a * (a - 1) / 2 + (b - a); }

ef_status ef_asm_create(const ef_mesh *mesh, const ef_dofmap *dofs, ef_asm **out, ef_ctx *ctx)
{
    ef_status st = EF_ENOMEM;
    ef_asm *a = calloc(1, sizeof *a);
    ef_index cap = 78 * mesh->n_elems;
    ef_index *row = malloc((size_t)EF_MAX(cap, 1) * sizeof *row);
    ef_index *col = malloc((size_t)EF_MAX(cap, 1) * sizeof *col);
    if (!a || !row || !col) goto done;
    a->n_elems = mesh->n_elems;
    ef_index np = 0;
    for (ef_index e = 0; e < mesh->n_elems; e++) {
        ef_index eq[12];
        ef_dofmap_elem(dofs, mesh, e, eq);
        for (int i = 0; i < 12; i++)
            for (int j = i + 1; j < 12; j++)
                if (eq[i] >= 0 && eq[j] >= 0) {
                    row[np] = EF_MIN(eq[i], eq[j]);
                    col[np] = EF_MAX(eq[i], eq[j]);
                    np++;
                }
    }
    if ((st = ef_sparse_create_pattern(dofs->n_eq, np, row, col, &a->A, ctx)) != EF_OK) goto done;
    free(row);
    free(col);
    row = col = NULL;
    st = EF_ENOMEM;
    a->pos = malloc((size_t)EF_MAX(cap, 1) * sizeof *a->pos);
    if (!a->pos) goto done;
    for (ef_index e = 0; e < mesh->n_elems; e++) {
        ef_index eq[12], *p = a->pos + 78 * e;
        ef_dofmap_elem(dofs, mesh, e, eq);
        for (int i = 0; i < 12; i++)
            for (int j = i; j < 12; j++)
                p[upper_index(i, j)] = (eq[i] >= 0 && eq[j] >= 0)
                    ? ef_sparse_find(a->A, EF_MIN(eq[i], eq[j]), EF_MAX(eq[i], eq[j]))
                    : EF_NONE;
    }
    st = EF_OK;
done:
    free(row);
    free(col);
    if (st != EF_OK) {
        ef_asm_free(&a, ctx);
        return st;
    }
    *out = a;
    return EF_OK;
}

void ef_asm_free(ef_asm **pa, ef_ctx *ctx)
{
    if (!pa || !*pa) return;
    ef_sparse_free(&(*pa)->A, ctx);
    free((*pa)->pos);
    free(*pa);
    *pa = NULL;
}

void ef_asm_add_elem(const ef_asm *a, ef_index e, const double ke[144], double *values)
{
    const ef_index *p = a->pos + 78 * e;
    for (int i = 0; i < 12; i++)
        for (int j = i; j < 12; j++) {
            ef_index q = p[upper_index(i, j)];
            if (q >= 0) values[q] += ke[12 * i + j];
        }
}

ef_index ef_asm_diag(const ef_asm *a, ef_index i)
{
    return ef_sparse_colptr(a->A)[i + 1] - 1;    /* sorted upper columns end at the diagonal */
}
