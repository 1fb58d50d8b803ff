~Version information
 vers.    2.0 : cwls log ascii standard - version 2.0
 wrap.    NO  : one line per depth step
~Well information
 strt.m    1200.0 : start depth
 stop.m    1200.6 : stop depth
 step.m    0.2    : step
 null.     -999.25 : null value
 well.     Corrie Beck 3 : well name
 comp.     Greyfell Petroleum Ltd : company
~Curve information
 dept.m     : depth
 gr.gapi    : gamma ray
 Rhob.g/cc  : bulk density
 nPhi.v/v   : neutron porosity
~Parameter information
 bht.degc   61.5 : bottom hole temperature
~Ascii
1200.0  60.1  2.401  0.21
1200.2  61.3  2.410  0.22
1200.4  -999.25  2.412  0.20
1200.6  59.9  2.399  -999.25
