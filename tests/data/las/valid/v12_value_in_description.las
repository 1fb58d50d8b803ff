~VERSION INFORMATION
 VERS.                          1.2:   CWLS LOG ASCII STANDARD -VERSION 1.2
 WRAP.                          NO:   ONE LINE PER DEPTH STEP
~WELL INFORMATION BLOCK
#MNEM.UNIT       DATA TYPE    INFORMATION
#---------    -------------   ------------------------------
 STRT.M                    1100.0000:
 STOP.M                    1101.0000:
 STEP.M                       0.2500:
 NULL.                     -999.2500:
 COMP.             COMPANY:   GREYFELL PETROLEUM LTD
 WELL.                WELL:   HARROW DEEP 2
 FLD .               FIELD:   TARNWICK
 LOC .            LOCATION:   12-34-056-07W5
 PROV.            PROVINCE:   NORTHMARCH
 SRVC.     SERVICE COMPANY:   CORRIE LOGGING SERVICES
 DATE.            LOG DATE:   25-DEC-1988
 UWI .      UNIQUE WELL ID:   100123405607W500
 API .          API NUMBER:   0012345678
 CTRY.             COUNTRY:   FICTLAND
~CURVE INFORMATION
#MNEM.UNIT      API CODE      CURVE DESCRIPTION
#---------    -------------   ------------------------------
 DEPT.M                      :   1  DEPTH
 GR  .GAPI                   :   2  GAMMA RAY
 ILD .OHMM                   :   3  DEEP RESISTIVITY
~PARAMETER INFORMATION
#MNEM.UNIT        VALUE       DESCRIPTION
#---------    -------------   ------------------------------
 BHT .DEGC        35.5000:   BOTTOM HOLE TEMPERATURE
 BS  .MM         200.0000:   BIT SIZE
 FD  .K/M3      1000.0000:   FLUID DENSITY
 MATR.             SAND:   NEUTRON MATRIX
 RMF .OHMM         0.2160:   MUD FILTRATE RESISTIVITY
~OTHER
     Note: The logging tools became stuck at 1101 metres.
~A  DEPTH     GR      ILD
 1100.00    45.1230    12.0500
 1100.25    47.0010    11.9900
 1100.50  -999.2500    10.1000
 1100.75    52.4400  -999.2500
 1101.00    55.0000     9.8765
