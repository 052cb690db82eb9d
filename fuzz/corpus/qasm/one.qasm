OPENQASM 2.0;
include "qelib1.inc";
qreg x[2];
qreg y[1];
ccx x[0],x[1],y[0];
cx x[0],y[0];
