~VERSION INFORMATION
 VERS.                 1.20:   CWLS LOG ASCII STANDARD -VERSION 1.2
 WRAP.                   NO:   ONE LINE PER DEPTH STEP
~WELL INFORMATION BLOCK
 STRT.F                5600.0000:
 STOP.F                5601.0000:
 STEP.F                   0.5000:
 NULL.                 -999.2500:
 COMP.             COMPANY:   GREYFELL PETROLEUM LTD
 WELL.                WELL:   FELLSIDE 9
 DATE.            LOG DATE:   04/07/1991 14:30
~CURVE INFORMATION
 DEPT.F                      :   1  DEPTH
 DT  .US/F                   :   2  SONIC TRANSIT TIME
 RHOB.G/C3                   :   3  BULK DENSITY
~A
  5600.0000    95.2500     2.3500
  5600.5000    96.0000  -999.2500
  5601.0000  -999.2500     2.3600
