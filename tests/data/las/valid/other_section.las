~VERSION INFORMATION
 VERS.    2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0
 WRAP.    NO  : ONE LINE PER DEPTH STEP
~WELL INFORMATION
 STRT.M    700.0 : START DEPTH
 STOP.M    700.2 : STOP DEPTH
 STEP.M    0.1   : STEP
 NULL.     -999.25 : NULL VALUE
~CURVE INFORMATION
 DEPT.M     : DEPTH
 VP  .M/S   : P-WAVE VELOCITY
~OTHER INFORMATION
   Logged in two runs; the tool string was re-zeroed at 650 m.

Remarks: depths are driller's depths. Time 12:30 on 3 June.
   # this line looks like a comment but is kept in ~O
~A
700.0   2500.5
700.1   2510.25
700.2   2520.125
