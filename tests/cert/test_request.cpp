// CertifyRequest (cert/request.hpp): validation of the user's text inputs (errors name the option, FILE:LINE or
// FILE:LINE:COLUMN), the keep-kind decision, and a certificate joined by the library alone.
// Oracles: the dimension of V(t^n; 1) in the Fibonacci model is the Fibonacci number F(n-1), F(1) = F(2) = 1
// (common practice: fusion rule t x t = 1 + t), so V(t^6; 1) has dimension 5; two Fibonacci qubits of three anyons each
// (anyons 1-3 and 4-6 of total charge t) span 2 x 2 = 4 dimensions (common practice: the standard encoding).
#include <doctest/doctest.h>

#include <string>

#include "support/helpers.hpp"
#include "zetabraid/cert/request.hpp"
#include "zetabraid/detail/parallel.hpp"
#include "zetabraid/error.hpp"

using namespace zb;

namespace {

CertifyArguments fib_args(const std::string& word = "s1 s2") {
  CertifyArguments a;
  a.model_path = zbtest::source_dir() + "/models/fibonacci.toml";
  a.anyons = "t t t t t t";
  a.total = "1";
  a.word = word;
  return a;
}

// The message of the InputError thrown while building a request from `a` ("" when none is thrown).
std::string input_error(const CertifyArguments& a) {
  try {
    CertifyRequest r(a);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

}  // namespace

TEST_CASE("CertifyRequest: the keep kind follows the inputs (none, charge spec, keep file)") {
  CertifyArguments a = fib_args();
  CertifyRequest all(a);
  CHECK(all.keep_kind() == KeepKind::kAll);
  CHECK(keep_kind_name(all.keep_kind()) == "all");
  CHECK(all.space().dimension() == 5);  // F(5) = 5
  CHECK(all.keep().kept() == 5);
  CHECK(all.keep_spec().empty());

  a.keep_spec = "1-3:t , 4-6:t";
  CertifyRequest charges(a);
  CHECK(charges.keep_kind() == KeepKind::kCharges);
  CHECK(keep_kind_name(charges.keep_kind()) == "charges");
  CHECK(charges.keep().kept() == 4);  // two qubits
  CHECK(charges.keep_spec() == "1-3:t,4-6:t");  // canonical text (keep_canonical)

  std::string dir = zbtest::tmpdir("zb_request");
  zbtest::spit(dir + "/keep.txt", "# two tree vectors\n1, 0, 0, 0, 0\n0, 0, 1, 0, 0\n");
  a.keep_spec.clear();
  a.keep_file = dir + "/keep.txt";
  CertifyRequest vectors(a);
  CHECK(vectors.keep_kind() == KeepKind::kVectors);
  CHECK(keep_kind_name(vectors.keep_kind()) == "vectors");
  CHECK(vectors.keep().kept() == 2);
  CHECK(vectors.keep_spec().empty());
}

TEST_CASE("CertifyRequest: option errors come first, before any file is read") {
  CertifyArguments a = fib_args();
  a.model_path = "/nonexistent/model.toml";  // never reached by the checks below
  CertifyArguments none = a;
  none.word.reset();
  CHECK(input_error(none) == "give the braid word with --word or --word-file");
  CertifyArguments both = a;
  both.keep_spec = "1-3:t";
  both.keep_file = "k.txt";
  CHECK(input_error(both) == "give --keep or --keep-file, not both");
  CertifyArguments method = a;
  method.method = "fast";
  CHECK(input_error(method).find("unknown method 'fast'") != std::string::npos);
  CertifyArguments prec = a;
  prec.precision = 8;
  CHECK(input_error(prec) == "--precision must be 16..65536 bits, got 8");
  for (int t : {0, -1, kMaxThreads + 1}) {
    CertifyArguments th = a;
    th.threads = t;
    CHECK(input_error(th) == "--threads must be 1..256 (omit it for all cores, at most 8)");
  }
  // a good option set reaches the model file
  CHECK(input_error(a).find("/nonexistent/model.toml") != std::string::npos);
}

TEST_CASE("CertifyRequest: the thread rule and the precision are carried into the options") {
  CertifyArguments a = fib_args();
  CHECK(CertifyRequest(a).options().threads == thread_count(0));
  a.threads = 2;
  a.precision = 128;
  a.method = "interval";
  CertifyRequest r(a);
  CHECK(r.options().threads == 2);
  CHECK(r.options().precision == 128);
  CHECK(r.options().method == Method::kInterval);
}

TEST_CASE("CertifyRequest: input errors name the file and line (keep file) or line and column (word file)") {
  std::string dir = zbtest::tmpdir("zb_request");
  CertifyArguments a = fib_args();
  zbtest::spit(dir + "/short.txt", "# comment\n1, 0\n");
  a.keep_file = dir + "/short.txt";
  CHECK(input_error(a).rfind(dir + "/short.txt:2:", 0) == 0);

  CertifyArguments w = fib_args();
  w.word.reset();
  zbtest::spit(dir + "/w.txt", "s1 s2\ns3 s9\n");
  w.word_file = dir + "/w.txt";
  CHECK(input_error(w).rfind(dir + "/w.txt:2:4:", 0) == 0);  // s9 is out of range for 6 anyons
  w.word = "s1";
  CHECK(input_error(w) == "give --word or --word-file, not both");

  CertifyArguments k = fib_args();
  k.keep_spec = "1-3:x";
  CHECK(input_error(k).rfind("column 5:", 0) == 0);
  CertifyArguments t = fib_args();
  t.total = "q";
  CHECK(input_error(t).find("unknown total charge 'q'") != std::string::npos);
  CertifyArguments z = fib_args();
  z.anyons = "t";
  z.total = "1";  // V(t; 1) = 0 (t is not the unit)
  CHECK_THROWS_AS(CertifyRequest{z}, InputError);
}

TEST_CASE("CertifyRequest: an empty word text is the trivial word, which leaks nowhere") {
  CertifyArguments a = fib_args("");
  a.keep_spec = "1-3:t,4-6:t";
  CertifyRequest req(a);
  CHECK(req.word().size() == 0);
  CertifyResult r = req.run();
  CHECK(r.verdict == Verdict::kLeakFree);  // the identity maps every subspace into itself
}

TEST_CASE("CertifyRequest: the certificate and GP script are those of the request's own inputs") {
  CertifyArguments a = fib_args("s3 s2 s3^-1");
  a.keep_spec = "1-3:t,4-6:t";
  a.method = "exact";
  CertifyRequest req(a);
  CertifyResult r = req.run();
  CHECK(r.verdict == Verdict::kLeaks);  // s3 exchanges anyons of the two qubits
  CertificateInputs in = req.certificate_inputs();
  CHECK(in.keep_kind == "charges");
  CHECK(in.keep_spec == req.keep_spec());
  CHECK(in.model == &req.model());
  CHECK(req.certificate(r) == certificate_json(in, r));
  CHECK(req.gp_script(r) == export_gp(in, r));
  // a moved request still points at its own data
  CertifyRequest moved = std::move(req);
  CHECK(moved.certificate(r) == certificate_json(moved.certificate_inputs(), r));
}
