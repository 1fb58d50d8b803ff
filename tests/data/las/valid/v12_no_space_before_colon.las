~VERSION INFORMATION
 VERS.                  1.2:   CWLS LOG ASCII STANDARD -VERSION 1.2
 WRAP.                  NO:   ONE LINE PER DEPTH STEP
~WELL INFORMATION BLOCK
#MNEM.UNIT       DATA TYPE    INFORMATION
#---------    -------------   ------------------------------
 STRT.M        1670.000000:
 STOP.M        1669.750000:
 STEP.M            -0.1250:
 NULL. -9999.0: NULL VALUE
 COMP.             COMPANY:   GREYFELL PETROLEUM LTD
 WELL.                WELL:   HARROW DEEP 2
 FLD .               FIELD:   TARNWICK
 LOC .            LOCATION:   BLOCK 7 NORTH
~CURVE INFORMATION
#MNEM.UNIT      API CODE      CURVE DESCRIPTION
#---------    -------------   ------------------------------
 DEPT.M                      :   1  DEPTH
 DT  .US/M               :   2  SONIC TRANSIT TIME
 RHOB.K/M3                   :   3  BULK DENSITY
 NPHI.V/V                    :   4   NEUTRON POROSITY
~A  DEPTH     DT    RHOB        NPHI
1670.000   123.450 2550.000    0.450
1669.875   123.450 -9999.0    0.450
1669.750   -9999.0 2550.000    0.450
