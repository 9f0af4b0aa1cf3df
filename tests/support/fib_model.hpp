// Fibonacci model built in code (unitary gauge), independent of the model loader.
// Data: Kitaev, Ann. Phys. 321 (2006) 2; Nayak et al., Rev. Mod. Phys. 80 (2008) 1083 (common practice):
//   t x t = 1 + t, F^{ttt}_t = [[1/phi, 1/sqrt(phi)], [1/sqrt(phi), -1/phi]] in the basis (1, t),
//   R^{tt}_1 = exp(-4 pi i/5), R^{tt}_t = exp(3 pi i/5); all other admissible F and R are 1.
#pragma once
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/model.hpp"

namespace zbtest {

inline zb::Model fibonacci_model(bool wrong_r = false) {
  zb::Model m;
  m.name = "Fibonacci (built in the tests)";
  m.field = zb::Field::make(10);
  m.labels = {"1", "t"};
  m.claims_unitary = true;
  m.has_r = true;
  m.init_fusion();
  m.set_fusion(0, 0, 0, 1);
  m.set_fusion(0, 1, 1, 1);
  m.set_fusion(1, 0, 1, 1);
  m.set_fusion(1, 1, 0, 1);
  m.set_fusion(1, 1, 1, 1);
  auto e = [&](const char* s) { return zb::parse_expression(s, m.field); };
  zb::Scalar one(m.field, 1);
  for (int a = 0; a < 2; ++a)
    for (int b = 0; b < 2; ++b)
      for (int c = 0; c < 2; ++c)
        for (int d = 0; d < 2; ++d)
          for (int x = 0; x < 2; ++x)
            for (int y = 0; y < 2; ++y)
              if (m.fusion(a, b, x) && m.fusion(x, c, d) && m.fusion(b, c, y) && m.fusion(a, y, d))
                m.set_f_symbol(a, b, c, d, x, y, one);
  zb::Scalar ip = e("zeta^2 + zeta^8");             // 1/phi
  zb::Scalar is = e("1/sqrt(1 + zeta^2 + zeta^8)");  // 1/sqrt(phi)
  m.set_f_symbol(1, 1, 1, 1, 0, 0, ip);
  m.set_f_symbol(1, 1, 1, 1, 0, 1, is);
  m.set_f_symbol(1, 1, 1, 1, 1, 0, is);
  m.set_f_symbol(1, 1, 1, 1, 1, 1, -ip);
  m.set_r_symbol(0, 0, 0, one);
  m.set_r_symbol(0, 1, 1, one);
  m.set_r_symbol(1, 0, 1, one);
  m.set_r_symbol(1, 1, 0, e(wrong_r ? "exp(4*pi*i/5)" : "exp(-4*pi*i/5)"));
  m.set_r_symbol(1, 1, 1, e("exp(3*pi*i/5)"));
  return m;
}

}  // namespace zbtest
