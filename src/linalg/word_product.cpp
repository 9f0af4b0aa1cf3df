// Straightforward reference implementation (left to right). To be replaced by the fast engines.
#include "zetabraid/linalg/word_product.hpp"

#include "zetabraid/error.hpp"

namespace zb {

Matrix word_product_columns(const std::vector<const Matrix*>& letters, const Matrix& start) {
  Matrix acc = start;
  for (const Matrix* m : letters) acc = *m * acc;
  return acc;
}

Matrix word_product(const std::vector<const Matrix*>& letters) {
  if (letters.empty()) throw MathError("empty word: no matrix shape to return");
  return word_product_columns(letters, Matrix::identity(letters.front()->field(), letters.front()->cols()));
}

void word_product_ball(acb_mat_t out, const std::vector<const Matrix*>& letters, const Matrix& start, long prec) {
  acb_mat_t acc, g, t;
  acb_mat_init(acc, start.rows(), start.cols());
  start.ball(acc, prec);
  for (const Matrix* m : letters) {
    acb_mat_init(g, m->rows(), m->cols());
    m->ball(g, prec);
    acb_mat_init(t, m->rows(), start.cols());
    acb_mat_mul(t, g, acc, prec);
    acb_mat_swap(acc, t);
    acb_mat_clear(t);
    acb_mat_clear(g);
  }
  acb_mat_set(out, acc);
  acb_mat_clear(acc);
}

}  // namespace zb
