/* export_mtx.c: K, M, K_G and the DOF map as files (format: see export_mtx.h).
 *
 * Invariants: equation i of the system is row/column i+1 in every file; a file is written
 * whole or reported as failed (a partly written file is removed).
 */
#define _POSIX_C_SOURCE 200809L
#include "export_mtx.h"

#include "mass.h"
#include "static.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

/* stdio buffer per file: large sequential writes (a million-DOF K is ~10^7 lines) */
#define EXPORT_BUFSIZE (1u << 20)

/* mkdir -p: every missing component of `dir`. */
static ef_status make_dir(const char *dir, ef_ctx *ctx)
{
    size_t n = strlen(dir);
    char *p = malloc(n + 1);
    if (!p) return EF_ENOMEM;
    memcpy(p, dir, n + 1);
    ef_status st = EF_OK;
    for (size_t i = 1; i <= n && st == EF_OK; i++) {
        if (p[i] != '/' && p[i] != '\0') continue;
        char c = p[i];
        p[i] = '\0';
        struct stat sb;
        if (mkdir(p, 0777) != 0 && errno != EEXIST) {
            ef_diag_error(ctx, NULL, "cannot create the directory '%s': %s", p, strerror(errno));
            st = EF_EIO;
        } else if (stat(p, &sb) != 0 || !S_ISDIR(sb.st_mode)) {
            ef_diag_error(ctx, NULL, "cannot export into '%s': '%s' is not a directory", dir, p);
            st = EF_EIO;
        }
        p[i] = c;
    }
    free(p);
    return st;
}

static FILE *open_out(const char *dir, const char *name, char *path, size_t n, ef_ctx *ctx)
{
    snprintf(path, n, "%s/%s", dir, name);
    FILE *f = fopen(path, "w");
    if (!f) {
        ef_diag_error(ctx, NULL, "cannot write '%s': %s", path, strerror(errno));
        return NULL;
    }
    setvbuf(f, NULL, _IOFBF, EXPORT_BUFSIZE);
    return f;
}

/* Close, and on a write error say so and remove the file. */
static ef_status close_out(FILE *f, const char *path, ef_ctx *ctx)
{
    int bad = ferror(f);
    int err = errno;
    if (fclose(f) != 0 && !bad) {
        bad = 1;
        err = errno;
    }
    if (!bad) return EF_OK;
    ef_diag_error(ctx, NULL, "cannot write '%s': %s", path, strerror(err));
    remove(path);
    return EF_EIO;
}

/* One matrix on the pattern, lower triangle (col, row) of our upper entries. */
static ef_status write_mtx(const ef_system *sys, const double *values, const char *dir,
                           const char *name, const char *what, ef_ctx *ctx)
{
    char path[4096];
    FILE *f = open_out(dir, name, path, sizeof path, ctx);
    if (!f) return EF_EIO;
    const ef_sparse *A = sys->asmb->A;
    const ef_index n = ef_sparse_n(A), nnz = ef_sparse_nnz(A);
    const ef_index *Ap = ef_sparse_colptr(A), *Ai = ef_sparse_rowind(A);
    fprintf(f, "%%%%MatrixMarket matrix coordinate real symmetric\n");
    fprintf(f, "%% eigenframe %s: %s of the free DOFs; row/column k is equation k of "
               "dofmap.csv\n", EF_VERSION, what);
    fprintf(f, "%% model units (force, length, seconds); every file of this export has the "
               "same pattern (explicit zeros kept)\n");
    fprintf(f, "%lld %lld %lld\n", (long long)n, (long long)n, (long long)nnz);
    for (ef_index j = 0; j < n; j++)
        for (ef_index p = Ap[j]; p < Ap[j + 1]; p++)     /* upper (i, j), i <= j: lower (j, i) */
            fprintf(f, "%lld %lld %.17g\n", (long long)(j + 1), (long long)(Ai[p] + 1), values[p]);
    return close_out(f, path, ctx);
}

/* A CSV field (RFC 4180): quoted when it holds a comma, a quote or a line break. */
static void csv_field(FILE *f, const char *s)
{
    if (!strpbrk(s, ",\"\r\n")) {
        fputs(s, f);
        return;
    }
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"') fputc('"', f);
        fputc(*s, f);
    }
    fputc('"', f);
}

static ef_status write_dofmap(const ef_system *sys, const char *dir, ef_ctx *ctx)
{
    char path[4096];
    FILE *f = open_out(dir, "dofmap.csv", path, sizeof path, ctx);
    if (!f) return EF_EIO;
    const ef_model *m = sys->m;
    const ef_mesh *mesh = sys->mesh;
    const ef_dofmap *d = sys->dofs;
    char place[512];
    fputs("equation,node,dof,x,y,z\n", f);
    for (ef_index eq = 0; eq < d->n_eq; eq++) {
        ef_index dof = d->dof_of_eq[eq], node = dof / 6;
        const double *x = mesh->xyz + 3 * node;
        if (node < mesh->n_model_nodes) {
            snprintf(place, sizeof place, "%s", m->nodes[node].name);
        } else {
            const ef_member *b = &m->members[mesh->node_member[node]];
            const double *a = m->nodes[b->node[0]].xyz;
            double s = 0.0;
            for (int c = 0; c < 3; c++) s += (x[c] - a[c]) * (x[c] - a[c]);
            snprintf(place, sizeof place, "member %s at %.6g", b->name, sqrt(s) / b->length);
        }
        fprintf(f, "%lld,", (long long)(eq + 1));
        csv_field(f, place);
        fprintf(f, ",%s,%.17g,%.17g,%.17g\n", ef_dof_names[dof % 6], x[0], x[1], x[2]);
    }
    return close_out(f, path, ctx);
}

ef_status ef_export_matrices(ef_system *sys, const double *M, const double *KG, const char *dir,
                             ef_ctx *ctx)
{
    double t0 = ef_clock();
    ef_status st = make_dir(dir, ctx);
    if (st == EF_OK) st = write_mtx(sys, sys->K, dir, "K.mtx", "stiffness K", ctx);
    if (st == EF_OK && M) st = write_mtx(sys, M, dir, "M.mtx", "mass M", ctx);
    if (st == EF_OK && KG)
        st = write_mtx(sys, KG, dir, "KG.mtx", "geometric stiffness K_G of the buckling load "
                       "(per unit load factor; critical factors solve (K + lambda K_G) x = 0)", ctx);
    if (st == EF_OK) st = write_dofmap(sys, dir, ctx);
    ef_ctx_time_add(ctx, "export matrices", ef_clock() - t0, 1);
    return st;
}

ef_status ef_export_system(ef_system *sys, const char *dir, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    ef_index nnz = ef_sparse_nnz(sys->asmb->A);
    ef_status st;
    ef_mass_info mi;
    ef_loadset *ls = NULL;
    double *u = NULL, *f = NULL, *KG = NULL;
    double *M = malloc((size_t)EF_MAX(nnz, 1) * sizeof *M);
    if (!M) return EF_ENOMEM;
    if ((st = ef_mass_assemble(sys, M, &mi, ctx)) != EF_OK) goto done;
    if (m->analyses.buckling) {
        KG = malloc((size_t)EF_MAX(nnz, 1) * sizeof *KG);
        if (!KG) { st = EF_ENOMEM; goto done; }
        if ((st = ef_loadset_build(m, m->analyses.buckling_load, &ls, ctx)) != EF_OK) goto done;
        if ((st = ef_static_solve_one(sys, ls, &u, &f, ctx)) != EF_OK) goto done;
        ef_system_kg(sys, f, false, KG);
    }
    st = ef_export_matrices(sys, M, KG, dir, ctx);
done:
    ef_loadset_free(&ls);
    free(u);
    free(f);
    free(KG);
    free(M);
    return st;
}
