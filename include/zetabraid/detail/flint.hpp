// Single place that includes the C number-theory libraries, for FLINT 2.x (separate antic and Arb) and FLINT 3.
#pragma once
#include <flint/flint.h>
#include <flint/fmpz.h>
#include <flint/fmpz_vec.h>
#include <flint/fmpq.h>
#include <flint/fmpz_poly.h>
#include <flint/fmpq_poly.h>
#include <flint/fmpz_poly_factor.h>
#include <flint/fmpq_mat.h>
#include <flint/nmod_poly.h>
#include <flint/ulong_extras.h>
#include <flint/arith.h>
#ifdef ZB_FLINT3
#include <flint/nf.h>
#include <flint/nf_elem.h>
#else
#include <antic/nf.h>
#include <antic/nf_elem.h>
#endif
#include <arb.h>
#include <acb.h>
#include <acb_mat.h>
