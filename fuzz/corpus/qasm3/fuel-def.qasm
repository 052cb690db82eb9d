OPENQASM 3.0;
include "stdgates.inc";
// written by oraculum 0.1.0
// spec: fuel-sum
// method: structural
// cost: qubits 25, toffoli 0, cnot 43, not 0, depth 51, toffoli depth 8, t-count 32
// fault-tolerant cost: temporary and 8 (4 T each), measured uncomputes 8 (no T), toffoli-equivalent 8
// registers whose names OpenQASM 3 reserves carry a trailing '_' (x_, y_, ctrl_)
// lines:
//   a[0] = a0 (input)
//   a[1] = a1 (input)
//   a[2] = a2 (input)
//   a[3] = a3 (input)
//   a[4] = a4 (input)
//   a[5] = a5 (input)
//   a[6] = a6 (input)
//   a[7] = a7 (input)
//   b[0] = b0 (data)
//   b[1] = b1 (data)
//   b[2] = b2 (data)
//   b[3] = b3 (data)
//   b[4] = b4 (data)
//   b[5] = b5 (data)
//   b[6] = b6 (data)
//   b[7] = b7 (data)
//   cout[0] = cout0 (output)
//   anc[0] (ancilla, starts and ends at 0)
//   anc[1] (ancilla, starts and ends at 0)
//   anc[2] (ancilla, starts and ends at 0)
//   anc[3] (ancilla, starts and ends at 0)
//   anc[4] (ancilla, starts and ends at 0)
//   anc[5] (ancilla, starts and ends at 0)
//   anc[6] (ancilla, starts and ends at 0)
//   anc[7] (ancilla, starts and ends at 0)
// def oracle: argument k is line k above; the ancillae are arguments that enter at |0> and leave at |0>; a subroutine, not a gate, because its measured uncomputes measure into the local bit m
def oracle(qubit a_0, qubit a_1, qubit a_2, qubit a_3, qubit a_4, qubit a_5, qubit a_6, qubit a_7, qubit b_0, qubit b_1, qubit b_2, qubit b_3, qubit b_4, qubit b_5, qubit b_6, qubit b_7, qubit cout_0, qubit anc_0, qubit anc_1, qubit anc_2, qubit anc_3, qubit anc_4, qubit anc_5, qubit anc_6, qubit anc_7) {
  bit m;
  ccx a_0, b_0, anc_0;
  cx anc_0, a_1;
  cx anc_0, b_1;
  ccx a_1, b_1, anc_1;
  cx anc_0, anc_1;
  cx anc_1, a_2;
  cx anc_1, b_2;
  ccx a_2, b_2, anc_2;
  cx anc_1, anc_2;
  cx anc_2, a_3;
  cx anc_2, b_3;
  ccx a_3, b_3, anc_3;
  cx anc_2, anc_3;
  cx anc_3, a_4;
  cx anc_3, b_4;
  ccx a_4, b_4, anc_4;
  cx anc_3, anc_4;
  cx anc_4, a_5;
  cx anc_4, b_5;
  ccx a_5, b_5, anc_5;
  cx anc_4, anc_5;
  cx anc_5, a_6;
  cx anc_5, b_6;
  ccx a_6, b_6, anc_6;
  cx anc_5, anc_6;
  cx anc_6, a_7;
  cx anc_6, b_7;
  ccx a_7, b_7, anc_7;
  cx anc_7, cout_0;
  h anc_7;
  m = measure anc_7;
  if (m) { cz a_7, b_7; x anc_7; }
  cx anc_6, cout_0;
  cx anc_6, a_7;
  cx a_7, b_7;
  cx anc_5, anc_6;
  h anc_6;
  m = measure anc_6;
  if (m) { cz a_6, b_6; x anc_6; }
  cx anc_5, a_6;
  cx a_6, b_6;
  cx anc_4, anc_5;
  h anc_5;
  m = measure anc_5;
  if (m) { cz a_5, b_5; x anc_5; }
  cx anc_4, a_5;
  cx a_5, b_5;
  cx anc_3, anc_4;
  h anc_4;
  m = measure anc_4;
  if (m) { cz a_4, b_4; x anc_4; }
  cx anc_3, a_4;
  cx a_4, b_4;
  cx anc_2, anc_3;
  h anc_3;
  m = measure anc_3;
  if (m) { cz a_3, b_3; x anc_3; }
  cx anc_2, a_3;
  cx a_3, b_3;
  cx anc_1, anc_2;
  h anc_2;
  m = measure anc_2;
  if (m) { cz a_2, b_2; x anc_2; }
  cx anc_1, a_2;
  cx a_2, b_2;
  cx anc_0, anc_1;
  h anc_1;
  m = measure anc_1;
  if (m) { cz a_1, b_1; x anc_1; }
  cx anc_0, a_1;
  cx a_1, b_1;
  h anc_0;
  m = measure anc_0;
  if (m) { cz a_0, b_0; x anc_0; }
  cx a_0, b_0;
}
qubit[8] a;
qubit[8] b;
qubit[1] cout;
qubit[8] anc;
oracle(a[0], a[1], a[2], a[3], a[4], a[5], a[6], a[7], b[0], b[1], b[2], b[3], b[4], b[5], b[6], b[7], cout[0], anc[0], anc[1], anc[2], anc[3], anc[4], anc[5], anc[6], anc[7]);
