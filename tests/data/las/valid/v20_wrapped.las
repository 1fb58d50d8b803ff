~Version Information
 VERS.                          2.0:   CWLS log ASCII Standard -VERSION 2.0
 WRAP.                          YES:   Multiple lines per depth step
~Well Information Block
#MNEM.UNIT       Data Type    Information
#---------    -------------   ------------------------------
 STRT.M                    910.000:
 STOP.M                    909.500:
 STEP.M                    -0.1250:
 NULL.                   -999.2500:   Null value
 COMP.    GREYFELL PETROLEUM LTD:   COMPANY
 WELL.    HARROW DEEP 3 (DEVIATED):   WELL
 FLD .                   TARNWICK:   FIELD
 LOC .              BLOCK 7 SOUTH:   LOCATION
~Curve Information Block
#MNEM.UNIT         API CODE          Curve Description
#---------       -------------   ------------------------------
 DEPT.M                        :   1  DEPTH
 DT  .US/M        60 520 32 00 :   2  SONIC TRANSIT TIME
 RHOB.K/M3        45 350 01 00 :   3  BULK DENSITY
 NPHI.V/V         42 890 00 00 :   4  NEUTRON POROSITY
 SFLU.OHMM        07 220 04 00 :   5  SHALLOW RESISTIVITY
 SFLA.OHMM        07 222 01 00 :   6  SHALLOW RESISTIVITY
 ILM .OHMM        07 120 44 00 :   7  MEDIUM RESISTIVITY
 ILD .OHMM        07 120 46 00 :   8  DEEP RESISTIVITY
~A  Log data section
 910.000000
 -999.2500   2692.7075      0.3140     19.4086     19.4086     13.1709
    12.2681
 909.875000
 -999.2500   2712.6460      0.2886     23.3987     23.3987     13.6129
    12.4744
 909.750000
 -999.2500   2692.8137      0.2730     22.5909     22.5909     13.6821
    12.6146
 909.625000
 -999.2500   2644.3650      0.2765     18.4831     18.4831     13.4159
    12.6900
 909.500000
 -999.2500   2586.2822      0.2996     13.9187     13.9187     12.9195
    12.7016
