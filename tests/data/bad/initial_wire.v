module m(CK, D, Q);
  input CK, D;
  output Q;
  reg q;
  wire w;
  assign w = D;
  initial w = 1'b0;
  always @(posedge CK) q <= D;
  assign Q = q;
endmodule
