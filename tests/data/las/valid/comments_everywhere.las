# Exported by a fictional in-house tool for the Tarnwick study
# second comment line before the version section

~VERSION INFORMATION
# comment inside ~V
 VERS.    2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0

 WRAP.    NO  : ONE LINE PER DEPTH STEP
~WELL INFORMATION
#MNEM.UNIT   VALUE    DESCRIPTION
#----.----   -----    -----------
 STRT.M    10.0 : START DEPTH
   # indented comment
 STOP.M    10.4 : STOP DEPTH
 STEP.M    0.2  : STEP

 NULL.     -999.25 : NULL VALUE
~CURVE INFORMATION
 DEPT.M     : DEPTH
# a comment between curves
 GR  .GAPI  : GAMMA RAY
~A   DEPT   GR
# comment in the data
10.0   30.0

10.2   31.0
   # indented data comment
10.4   32.0
